// Package profile reads measured concentration–depth (or hardness–depth)
// profiles from lab files and converts them to SI units.
//
// Every quantity inside a Profile is SI: depth in metres, temperature in
// kelvin, time in seconds, thickness in metres. Measured values stay in the
// file's own unit (wt%, at%, HV…), recorded in ValueUnit.
//
// # Files
//
// Read chooses the reader by extension: .csv, .tsv and .txt are delimited
// text, .xlsx (and .xlsm) are workbooks. ReadAll also takes folders.
// Inputs are opened read-only.
//
// A text table may start with metadata lines "# key: value" (keys are
// case-insensitive). Interpreted keys: id, temperature, time, lot,
// material, quantity, thickness, temperature_sigma, and value (the name of
// the value column when several columns could hold it). A unit may sit in
// the value ("# temperature: 925 C") or in the key ("# temperature_C: 925").
// Every key, interpreted or not, is kept in Profile.Meta. Other '#' lines
// are comments. Then comes a header row and one row per point.
// The separator (',', ';' or tab) is sniffed from the header; with ';' or
// tab a decimal comma is accepted. There, a number such as 1.025 or 1,025
// (1–3 digits, a mark, exactly 3 digits) may hold a thousands separator:
// it is read only when the file's other numbers show the same mark as
// their decimal mark, and refused otherwise. UTF-8 with or without BOM,
// UTF-16 with BOM, Latin-1 headers, LF, CRLF and CR line ends are read.
//
// Columns are recognised by their header, case-insensitively, the unit
// written after '_', ' ', '/' or in brackets ("depth_mm", "depth (mm)",
// "depth [in]", "Depth/µm"):
//
//	depth_<unit>, distance_<unit>      depth (m, cm, mm, um/µm, nm, in, mil); required, with unit
//	profile, id, specimen, sample      profile id: its presence makes the table a long table
//	temperature_<unit>, temp_, T_      hold temperature (K, C, F)
//	time_<unit>, t_, elapsed_          hold time (s, min, h, d)
//	temperature_sigma_<unit>           standard uncertainty of the temperature
//	thickness_<unit>                   specimen thickness
//	lot, material, quantity            text
//	sigma                              standard uncertainty of the value (value's unit)
//	anything else                      the measured value if it holds numbers (C_wt%, N_at%,
//	                                   HV0.5, hardness_HV, carbon (wt%)…), otherwise text kept in Meta
//
// Without an id column the whole table is one profile, whose id is the
// "id" metadata or the file's base name. With an id column, rows are
// grouped into profiles in order of first appearance; temperature, time,
// lot and the other per-profile columns must keep one value within a
// profile (blank cells are allowed).
//
// A workbook may hold a sheet per profile (metadata cells above the header;
// the sheet name is the default id), long sheets, or both. Metadata is
// "key: value" in one cell, or key | value (| unit) in cells of one row,
// with blank or merged cells allowed between them and a label allowed
// before an interpreted key; an interpreted key written any other way
// (more cells, two keys in a row, nothing beside it, a key cell merged
// over rows with a value on each) is an error, never dropped. The header
// row is the first row naming a depth column; sheets without one (notes,
// charts) and hidden sheets are skipped. Cells are read as stored, not as
// displayed; numbers may also be text, with a decimal comma. A logical
// value (TRUE/FALSE), an error value (#DIV/0!) or a formula without a
// stored result in a column under the header is an error. Every part of
// the archive is checked against its declared size and CRC-32 before
// anything is read; a damaged, password-protected (encrypted) or old
// binary (.xls) workbook is refused, naming the file and the part.
//
// # Limits
//
// Numbers outside these bounds are refused at their line or cell: depths,
// positions and thicknesses beyond 1 m; temperatures above 6000 K;
// times shorter than 1 ns or longer than 1e10 s; measured values and sigma
// beyond ±1e12 in the file's unit; sigma below 1e-12. A text line may
// hold 1 MiB. A workbook may unpack to at most MaxUnzipSize (256 MiB), at
// most 64 MiB of it in parts that are not read, and, beyond 8 MiB, to at
// most 100 times its own size; a cell holds at most 32 767 characters;
// the cells of one workbook deliver at most 256 MiB of text and cells (a
// shared string counts at every cell that uses it); a worksheet part is
// listed once. The profiles of one file keep at most 16 MiB of text (ids,
// metadata and text columns, which every profile copies) beyond, for a text
// file, the size of the file itself: a long table of a million profiles
// is read, a metadata line that every profile copies is not multiplied
// without bound. Messages quote
// at most 40 characters of a cell or line.
//
// # Errors
//
// Every error from the readers is an *Error giving the file, the line (or
// sheet and cell), the column, what is wrong and what to do; its kind can
// be tested with errors.Is (ErrNumber, ErrUnit, ErrNoData…). Unsorted and
// repeated depths are valid; fewer than three points is left for the fit
// to judge.
package profile
