package main

import (
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots/acceptance/sampling"
	"lotproof/lots/render"
)

type planOptions struct {
	AQL, RQL       string
	Producer, Cons float64
	Table          tableOption
	Out            output
}

func newPlanCmd(g *globalOptions, st streams) *cobra.Command {
	var o planOptions
	cmd := &cobra.Command{
		Use:   "plan --aql P1 --rql P2 [--producer-risk A] [--consumer-risk B]",
		Short: "Design a one-sided variables sampling plan (n, k) and print its OC curve",
		Long: `plan designs a one-sided variables sampling plan with sigma unknown: test n
items and accept the lot when (mean - L)/SD >= k (or (U - mean)/SD >= k).
It is the smallest n whose acceptance probability is at least 1 - A at the
fraction nonconforming P1 (AQL) and at most B at P2 (RQL), computed exactly
from the noncentral t distribution; k holds the producer's risk at A.

It also prints the Wallis approximation, the attributes plan (n, c) that
meets the same two points (binomial), and the operating characteristic
(probability of acceptance against fraction nonconforming) of both plans.
Fractions may be written as 0.01 or 1%.`,
		Args: exactArgs(0, "no arguments"),
		RunE: withOutput(g, st, &o.Out, func(args []string) error {
			return runPlan(o, st)
		}),
	}
	cmd.Flags().StringVar(&o.AQL, "aql", "", "acceptable quality level: fraction nonconforming accepted with probability 1 - producer risk (required)")
	cmd.Flags().StringVar(&o.RQL, "rql", "", "rejectable quality level: fraction nonconforming accepted with probability at most the consumer risk (required)")
	cmd.Flags().Float64Var(&o.Producer, "producer-risk", 0.05, "producer's risk alpha: probability of rejecting a lot at the AQL")
	cmd.Flags().Float64Var(&o.Cons, "consumer-risk", 0.10, "consumer's risk beta: probability of accepting a lot at the RQL")
	addTableFlag(cmd, &o.Table, "plans", "oc")
	return cmd
}

func init() { register(newPlanCmd) }

// parseFraction reads 0.01 or 1%.
func parseFraction(flag, s string) (float64, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return 0, usageError{fmt.Errorf("--%s is required", flag)}
	}
	scale := 1.0
	if strings.HasSuffix(t, "%") {
		scale = 0.01
		t = strings.TrimSpace(strings.TrimSuffix(t, "%"))
	}
	v, err := strconv.ParseFloat(t, 64)
	v *= scale
	if err != nil || !(v > 0 && v < 1) {
		return 0, usageError{fmt.Errorf("--%s %q: expected a fraction between 0 and 1 (e.g. 0.01 or 1%%)", flag, s)}
	}
	return v, nil
}

func runPlan(o planOptions, st streams) error {
	if err := o.Table.check(); err != nil {
		return err
	}
	p1, err := parseFraction("aql", o.AQL)
	if err != nil {
		return err
	}
	p2, err := parseFraction("rql", o.RQL)
	if err != nil {
		return err
	}
	res, err := sampling.Design(p1, p2, o.Producer, o.Cons)
	if err != nil {
		return err
	}
	v, a := res.Variables, res.Attributes
	return emit(st.Out, func(w io.Writer) error {
		if o.Out.Format == render.JSON {
			return render.WriteJSON(w, res)
		}
		pt := render.NewTable("Sampling plans", "plan", ">n", ">k or c", ">risk at AQL", ">Pa at RQL")
		pt.Add("variables, sigma unknown (exact)", strconv.Itoa(v.N), render.F(v.K, 4), render.F(v.ProducerRisk, 4), render.F(v.ConsumerRisk, 4))
		pt.Add("variables, Wallis approximation", render.F(res.Wallis.N, 1), render.F(res.Wallis.K, 4), "", "")
		pt.Add("attributes (binomial)", strconv.Itoa(a.N), strconv.Itoa(a.C), render.F(a.ProducerRisk, 4), render.F(a.ConsumerRisk, 4))
		pt.Note("AQL %g with producer's risk %g; RQL %g with consumer's risk %g.", p1, o.Producer, p2, o.Cons)
		pt.Note("Variables plan: test n items, accept when (mean - L)/SD >= k (or (U - mean)/SD >= k); any k in [%.4f, %.4f] meets both risks at n = %d.", v.KMin, v.KMax, v.N)
		pt.Note("Attributes plan: test n items, accept when at most c are nonconforming.")
		oc := render.NewTable("Operating characteristic (probability of acceptance)", ">fraction nonconforming", ">variables", ">attributes")
		for _, q := range res.OC {
			oc.Add(render.N(q.P, 4), render.F(float64(q.PaVariables), 4), render.F(float64(q.PaAttributes), 4))
		}
		oc.Note("Method: %s.", res.Method)
		oc.Note("Caution: %s", sampling.Caution)
		pt.Name, oc.Name = "plans", "oc"
		tables, err := o.Table.pick(o.Out.Format, []*render.Table{pt, oc})
		if err != nil {
			return err
		}
		return writeTables(w, o.Out.Format, tables...)
	})
}
