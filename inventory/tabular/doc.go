// Package tabular reads the tables planners export, whatever program wrote
// them: delimited text in any of the usual dialects and encodings, and
// workbooks (.xlsx). It is the one reader under the demand-history and
// items readers, so both accept the same shapes and refuse the same
// mistakes with the same words.
//
// A delimited file's dialect is found from the file itself unless the
// caller fixes it: the encoding (UTF-8 with or without a byte-order mark,
// UTF-16 with a mark, else a single-byte code page named by the caller or
// Windows-1252 for bytes that are not UTF-8), a leading "sep=X" line, a
// title line above the header, and the delimiter (',', ';', tab or '|',
// the one the header line holds most often outside quotes). Every record
// must have the header's number of fields (trailing empty fields aside);
// blank lines are skipped. Errors are *Error values naming the file, the
// line and, where one is at fault, the column.
//
// Cells are interpreted by small value types: Numbers (the decimal mark,
// given or found from the file, and digit grouping where it is
// unambiguous), DateLayout (the usual day, month and year orders,
// timestamps, and spreadsheet serial day numbers), and the header rules of
// Columns (names compared ignoring case, surrounding spaces and the
// difference between space, '_' and '-'; a caller's map of other names; an
// unknown name close to a known one refused).
package tabular
