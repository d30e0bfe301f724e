// Package importers reads distributor CSV exports and approved-parts lists
// into the catalog: it sniffs the file's shape (separator, decimal comma,
// byte-order mark, text encoding), guesses which column holds which catalog
// field from the usual trade words in the header (or takes a saved Mapping),
// parses every value with package units, and writes the parts through the
// catalog store in one transaction, so an import is all or nothing. Import
// streams: it hands the store a few thousand parts at a time inside that
// transaction (catalog.UpsertSession), so its memory stays flat however
// large the files are. The catalog's own CSV export (catalog.Store.WriteCSV)
// is recognised by its header and re-imports unchanged.
//
// Every row that cannot be used, or whose reading is in doubt, is reported
// with its file, line, column and raw text (see ParseError and Problem); a
// misread "4K99" or "±0.1%" that silently became a wrong design would be
// worse than a skipped row.
//
// The reader streams (encoding/csv with ReuseRecord) and caps the number of
// columns and the length of a record, so a file that is not CSV at all, or
// one built to exhaust memory, gets a clear error instead of a crash.
package importers
