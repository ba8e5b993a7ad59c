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
// tab a decimal comma is accepted. UTF-8 with or without BOM, UTF-16 with
// BOM, Latin-1 headers, LF, CRLF and CR line ends are read.
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
// A workbook may hold a sheet per profile (metadata cells above the header,
// as "key: value" in one cell or key and value in two adjacent cells; the
// sheet name is the default id), long sheets, or both. The header row is
// the first row naming a depth column; sheets without one (notes, charts)
// and hidden sheets are skipped. Cells are read as stored, not as
// displayed; numbers may also be text, with a decimal comma.
//
// # Errors
//
// Every error from the readers is an *Error giving the file, the line (or
// sheet and cell), the column, what is wrong and what to do; its kind can
// be tested with errors.Is (ErrNumber, ErrUnit, ErrNoData…). Unsorted and
// repeated depths are valid; fewer than three points is left for the fit
// to judge.
package profile
