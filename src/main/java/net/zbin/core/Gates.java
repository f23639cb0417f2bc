package net.zbin.core;

/**
 * Loss and phase limits a part must meet before its value is graded. Null means no limit.
 *
 * @param dMax        highest dissipation factor D accepted
 * @param qMin        lowest quality factor Q accepted
 * @param esrMaxOhm   highest ESR in ohms accepted
 * @param thetaMinDeg lowest phase angle in degrees accepted
 * @param thetaMaxDeg highest phase angle in degrees accepted
 */
public record Gates(Double dMax, Double qMin, Double esrMaxOhm, Double thetaMinDeg, Double thetaMaxDeg) {
    public static final Gates NONE = new Gates(null, null, null, null, null);

    public Gates {
        if (dMax != null && !(dMax > 0)) throw new SpecException("gates.d_max", "must be > 0 (was " + dMax + ")");
        if (dMax != null) Plausible.dissipation("gates.d_max", dMax);
        if (qMin != null && !(qMin > 0)) throw new SpecException("gates.q_min", "must be > 0 (was " + qMin + ")");
        if (esrMaxOhm != null && !(esrMaxOhm > 0)) throw new SpecException("gates.esr_max_ohm", "must be > 0 (was " + esrMaxOhm + ")");
        if (thetaMinDeg != null && (thetaMinDeg < -90 || thetaMinDeg > 90))
            throw new SpecException("gates.theta_min_deg", "must be within -90..90 (was " + thetaMinDeg + ")");
        if (thetaMaxDeg != null && (thetaMaxDeg < -90 || thetaMaxDeg > 90))
            throw new SpecException("gates.theta_max_deg", "must be within -90..90 (was " + thetaMaxDeg + ")");
        if (thetaMinDeg != null && thetaMaxDeg != null && thetaMinDeg >= thetaMaxDeg)
            throw new SpecException("gates.theta_min_deg", "must be below theta_max_deg (" + thetaMinDeg + " >= " + thetaMaxDeg + ")");
        if (dMax != null && qMin != null && qMin > 1 / dMax)
            throw new SpecException("gates.q_min", "q_min " + qMin + " with d_max " + dMax
                    + " passes nothing (Q = 1/D, so q_min must be <= " + 1 / dMax + ")");
    }

    /** The gates' one comparison: a loss or ESR passes at or below its limit (NaN never passes). */
    public static boolean passes(double metric, double limit) { return metric <= limit; }

    /** The D limit of a Q gate: D = 1/Q, so a Q gate and a D gate never disagree. */
    public static double dOfQ(double qMin) { return 1 / qMin; }

    /**
     * The reason code of the first gate the reading fails, or null when it passes all. D and Q go
     * through one quantity, D = R/|X| (Q ≥ q_min is D ≤ 1/q_min), so the two gates never disagree,
     * also for an R that compensation left slightly below zero.
     */
    public Reason firstFailure(Impedance z) {
        double d = z.d();
        if (dMax != null && !passes(d, dMax)) return Reason.D_HIGH;
        if (qMin != null && !passes(d, dOfQ(qMin))) return Reason.Q_LOW;
        if (esrMaxOhm != null && !passes(z.esrOhm(), esrMaxOhm)) return Reason.ESR_HIGH;
        if (thetaMinDeg == null && thetaMaxDeg == null) return null; // θ (an atan2) only when a gate needs it
        double t = z.thetaDeg();
        if (thetaMinDeg != null && t < thetaMinDeg) return Reason.THETA_OUT;
        if (thetaMaxDeg != null && t > thetaMaxDeg) return Reason.THETA_OUT;
        return null;
    }
}
