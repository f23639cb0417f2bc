package net.zbin.core;

import java.util.ArrayList;
import java.util.List;

/**
 * A recipe's by-value rule ({@link Grader#byValue(Recipe, double)}) as bands of deviation, each with its one
 * outcome, covering every deviation: so {@code tune} counts a setting's bins from sorted deviations without a rule
 * of its own. Each band is judged by the rule itself, at its edge (a closed one-point band) or inside it.
 *
 * @param bands in ascending order, neighbours with the same outcome merged
 */
public record ValueBands(List<Band> bands) {
    /**
     * Deviations from {@code lo} to {@code hi} in %, each end in the band or not, and the outcome of every deviation in it.
     */
    public record Band(double lo, boolean loIn, double hi, boolean hiIn, Grading.Outcome outcome) {}

    public ValueBands {
        bands = List.copyOf(bands);
    }

    public static ValueBands of(Recipe r) {
        double[] e = Grader.valueEdges(r);
        List<Band> out = new ArrayList<>();
        double lo = Double.NEGATIVE_INFINITY;
        for (double edge : e) {
            gap(r, lo, edge, out);
            add(out, new Band(edge, true, edge, true, Grader.byValue(r, edge)));
            lo = edge;
        }
        gap(r, lo, Double.POSITIVE_INFINITY, out);
        return new ValueBands(out);
    }

    /** The open band (a, b), judged at a deviation inside it; none when no double lies between a and b. */
    private static void gap(Recipe r, double a, double b, List<Band> out) {
        double inside;
        if (Double.isInfinite(a) && Double.isInfinite(b)) inside = 0;
        else if (Double.isInfinite(a)) inside = b - 1 - Math.abs(b);
        else if (Double.isInfinite(b)) inside = a + 1 + Math.abs(a);
        else inside = a + (b - a) / 2;
        if (!(inside > a && inside < b)) {
            inside = Math.nextUp(a);
            if (!(inside < b)) return;
        }
        add(out, new Band(a, false, b, false, Grader.byValue(r, inside)));
    }

    private static void add(List<Band> out, Band b) {
        if (!out.isEmpty()) {
            Band p = out.get(out.size() - 1);
            if (p.outcome().equals(b.outcome()) && p.hi() == b.lo() && (p.hiIn() || b.loIn())) {
                out.set(out.size() - 1, new Band(p.lo(), p.loIn(), b.hi(), b.hiIn(), p.outcome()));
                return;
            }
        }
        out.add(b);
    }

    /** The outcome of a deviation, by the bands (the same as the rule's). */
    public Grading.Outcome outcome(double devPct) {
        for (Band b : bands)
            if ((devPct > b.lo() || b.loIn() && devPct == b.lo()) && (devPct < b.hi() || b.hiIn() && devPct == b.hi())) return b.outcome();
        throw new IllegalArgumentException("deviation " + devPct + " % is in no band (not a number?)");
    }
}
