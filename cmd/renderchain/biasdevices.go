package main

import (
	"fmt"
	"io"
	"text/tabwriter"

	"renderchain/bias"
	"renderchain/models"
)

// biasPrintFETsAndOpAmps prints the JFETs, MOSFETs and op-amps of an
// operating point (the transistor and diode tables are biasPrint's).
func biasPrintFETsAndOpAmps(w io.Writer, b *bias.Bias) {
	if len(b.FETs) > 0 {
		fmt.Fprintln(w)
		tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "FET\tkind\tVd\tVg\tVs\tVgs\tVds\tId\tP\tregion\t")
		for _, f := range b.FETs {
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t\n", f.Ref, f.Kind, biasVolts(f.Vd), biasVolts(f.Vg), biasVolts(f.Vs),
				biasVolts(f.Vgs), biasVolts(f.Vds), models.FormatValue(f.Id, "A"), models.FormatValue(f.Power, "W"), f.Region)
		}
		tw.Flush()
	}
	if len(b.OpAmps) > 0 {
		fmt.Fprintln(w)
		tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "op-amp\tV+in\tV−in\tout\tswing low\tswing high\troom down\troom up\tregion\t")
		for _, a := range b.OpAmps {
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t\n", a.Ref, biasVolts(a.Vnoninv), biasVolts(a.Vinv), biasVolts(a.Vout),
				biasVolts(a.Low), biasVolts(a.High), biasVolts(a.RoomDown), biasVolts(a.RoomUp), a.Region)
		}
		tw.Flush()
	}
}
