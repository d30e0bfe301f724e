package main

import (
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"plumb/optimize/family"
)

// familiesHelp is `plumb help families`: every circuit family of the
// registry with what a spec gives it and what a design fills.
func familiesHelp() string {
	var b strings.Builder
	b.WriteString(`A spec names the circuit family of its stage (family:), or several the search
may choose from (families:); a design names the one it is built as. The
families, from plumb's registry:

`)
	for _, f := range family.All() {
		fmt.Fprintf(&b, "  %s\n      %s\n", f.Name, f.About)
		input := map[family.Input]string{family.SingleEnded: "input.single_ended", family.Differential: "input.differential and input.common_mode",
			family.Current: "input.current and input.common_mode (the shunt's low side)"}[f.Input]
		fmt.Fprintf(&b, "      input: %s\n", input)
		switch {
		case f.OutputRange:
			b.WriteString("      gain: none; give output, the range the input maps onto\n")
		default:
			fmt.Fprintf(&b, "      gain: in %s\n", f.GainUnit())
		}
		ref := map[family.RefUse]string{family.RefNone: "refused (the stage has no reference input)",
			family.RefOutput: "optional, the output at zero input", family.RefShift: "required, the offset comes from it"}[f.Reference]
		fmt.Fprintf(&b, "      reference: %s\n", ref)
		if f.Search.Strappings {
			b.WriteString("      design: one amplifier whose matched network the catalog holds, and its strapping\n" +
				"              (amplifier.strapping: the pin connections, e.g. \"IN-=vn IN+=vp FB=out REF=ref\")\n")
		} else if f.Integrated() {
			b.WriteString("      design: one amplifier with matched resistors inside, at one of its gains\n")
		} else {
			pos, _ := f.Positions(family.Options{})
			fmt.Fprintf(&b, "      design positions: %s\n", strings.Join(pos, ", "))
			var opts []string
			for _, o := range []struct {
				bit  family.Option
				name string
			}{{family.AllowRefDivider, "ref_divider"}, {family.AllowBuffer, "buffer"}, {family.AllowOffsetToInverting, "offset_to_inverting"}} {
				if f.Allows&o.bit != 0 {
					opts = append(opts, o.name)
				}
			}
			if len(opts) > 0 {
				fmt.Fprintf(&b, "      design options: %s\n", strings.Join(opts, ", "))
			}
		}
		b.WriteString("\n")
	}
	b.WriteString("The example specs (plumb solve NAME) show each family in use.\n")
	return b.String()
}

func newFamiliesHelpTopic() *cobra.Command {
	return &cobra.Command{
		Use:   "families",
		Short: "The circuit families a spec may name, and what each takes",
		Long:  familiesHelp(),
	}
}
