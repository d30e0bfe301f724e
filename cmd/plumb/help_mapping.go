package main

import "github.com/spf13/cobra"

// mappingHelp is `plumb help mapping`: the mapping file, in our own words.
const mappingHelp = `Most exports import with no mapping: plumb reads each header, recognises
the usual trade words ("Mfr Part #", "Tol.", "Tempco", "Unit Price [GBP]",
"Input CM High (V from V+)") and units in brackets, and prints how it read
every column with --dry-run. When an export is too odd for that, a mapping
file says it once. It is YAML with these keys, all optional:

  kind: resistor          resistor, network or amplifier (blank: guessed)

  columns:                field: header text of the column holding it
    part: Order Code      (case, spaces and punctuation in the header do
    resistance: Value      not matter)
    tolerance: Grade

  price_breaks:           one column per price break, with the quantity
    - column: Price 1000+ it starts at
      min_qty: 1000

  fixed:                  a value for every row, for fields no column holds
    currency: EUR
    technology: thin-film
    maker: Orrin Resistive

  units:                  how bare numbers of a field are read when the
    tolerance: "%"        header does not say: a unit ("%", mV, nA, V/us,
    vos: mV               dB ...), or fraction for tolerances written as
                          0.001 for 0.1 %

  decimal_comma: true     numbers written 0,125 (blank: sniffed)

The field names are those --dry-run prints (part, maker, resistance,
tolerance, tcr, power, package, price, currency, stock, supply_min, vos,
cm_neg, cm_pos, swing_neg, swing_pos, aol, cmrr, gbw, ...). A bare
tolerance with no % in the cell, the header or units: is refused as
ambiguous. Anchors and aliases (& and *) are not allowed.

Save the mapping a run used with --save-mapping NAME (the path is printed);
use it with --mapping NAME, or give a file with --mapping FILE.yaml. Saved
mappings live in the user configuration directory under plumb/mappings.

Example, for an export whose prices carry no currency and whose tolerance
column holds bare percent figures:

  kind: resistor
  columns:
    part: Item
    resistance: R
    tolerance: Tol
  fixed:
    currency: USD
  units:
    tolerance: "%"
`

func newMappingHelpTopic() *cobra.Command {
	return &cobra.Command{
		Use:   "mapping",
		Short: "The mapping file that tells import which column holds what",
		Long:  mappingHelp,
	}
}
