package main

import "github.com/spf13/cobra"

// mappingHelp is `plumb help mapping`: the mapping file, in our own words.
const mappingHelp = `Most exports import with no mapping: plumb reads each header, recognises
the usual trade words ("Mfr Part #", "Tol.", "Tempco", "Unit Price [GBP]",
"Input CM High (V from V+)") and units in brackets, and prints how it read
every column with --dry-run. When an export is too odd for that, a mapping
file says it once. It is YAML with these keys, all optional:

  kind: resistor          resistor, network, amplifier or reference
                          (blank: guessed)

  columns:                field: header text of the column holding it
    part: Order Code      (case, spaces and punctuation in the header do
    resistance: Value      not matter)
    tolerance: Grade

  price_breaks:           one column per price break, with the quantity
    - column: Price 1000+ it starts at; a column whose header states its
      min_qty: 1000       quantity ("Price (EUR) 1pc", "10+ (USD)") is a
                          break even when the mapping does not list it

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
cm_neg, cm_pos, swing_neg, swing_pos, aol, cmrr, gbw, supply_range
("2.7 V to 36 V", "±1.35V ~ ±18V" read as its 2.7..36 V span), ...). A bare
tolerance with no % in the cell, the header or units: is refused as
ambiguous. Anchors and aliases (& and *) are not allowed.

Voltage references (kind reference) are recognised by an output-voltage
column ("Vout", "Output Voltage"). Their fields: output_voltage, tolerance
(the initial accuracy, "±0.05%"), drift (ppm/K; ppm/°C is the same number),
temp_range ("-40 to 125 °C", "-40°C ~ 125°C") or temp_min and temp_max,
noise_pp (0.1-10 Hz peak to peak, "10 µVp-p"), noise_v (density),
supply_range ("2.7V ~ 18V") or supply_min and supply_max, dropout,
load_source, load_sink, output_resistance (ohm, or a load regulation in
ppm/mA, %/mA or µV/mA, turned into ohm at the output voltage), long_term
(ppm over 1000 h), iq and topology (series or shunt). Only the output
voltage and the accuracy are required; an accuracy looser than 5 %, a
drift above 1000 ppm/K or an output outside 0.5 V to 50 V is refused as a
likely slip unless --allow-unusual.

The matched resistors inside an amplifier (field network) are one cell of
clauses separated by ";": each element as NAME VALUE A~B (the two nodes it
joins), "amp INV NONINV OUT" for the nodes of the internal op-amp, and
"pins P1 P2 ..." for the nodes reachable from outside:

  R1 25k IN-~INV; R2 25k INV~SENSE; R3 25k IN+~NI; R4 25k NI~REF;
  amp INV NI OUT; pins IN- IN+ REF SENSE OUT

Their tolerances come from columns of their own: network_tolerance (each
element's), network_ratio_tolerance (matching) and network_tracking
(ppm/K); a blank one is unknown. A cell that does not read, or a network
that does not hold together (a value of zero, an op-amp input on no
element, a pin that is no node), skips the row naming its line and column.

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
