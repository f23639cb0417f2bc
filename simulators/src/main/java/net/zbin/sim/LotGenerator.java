package net.zbin.sim;

import java.util.Locale;
import java.util.Random;

/** Draws the parts of a lot from a scenario, reproducibly for a given seed. */
public final class LotGenerator {
    /**
     * One part as the handler presents it.
     *
     * @param index        0-based position in the lot
     * @param partId       part id written on the trigger
     * @param state        what the contacts see: the part, nothing (open) or a short
     * @param model        the part's physics (null when state is not PART)
     * @param intermittent chance that one reading of it sees an open contact
     */
    public record SimPart(long index, String partId, Contacts.State state, PartModel model, double intermittent) {}

    private final Scenario sc;
    private final Random rnd;
    private long next;

    public LotGenerator(Scenario scenario, long seed) {
        this.sc = scenario;
        this.rnd = new Random(seed);
    }

    public SimPart next() {
        long i = next++;
        String id = String.format(Locale.ROOT, "%s-%06d", sc.lot().partPrefix(), i + 1);
        Scenario.ContactFaults cf = sc.contact();
        double u = rnd.nextDouble();
        if (u < cf.openRate()) return new SimPart(i, id, Contacts.State.OPEN, null, 0);
        if (u < cf.openRate() + cf.shortRate()) return new SimPart(i, id, Contacts.State.SHORT, null, 0);
        double intermittent = rnd.nextDouble() < cf.intermittentRate() ? cf.intermittentP() : 0;
        return new SimPart(i, id, Contacts.State.PART, model(), intermittent);
    }

    private PartModel model() {
        Scenario.Part p = sc.part();
        double v = p.nominal() * (1 + (p.offsetPct() + p.spreadPct() * rnd.nextGaussian()) / 100);
        double d = rnd.nextDouble() < p.lossyRate() ? p.lossyLoss() : Math.abs(p.lossMean() + p.lossSigma() * rnd.nextGaussian());
        double par = p.parasitic() == null ? 0 : p.parasitic();
        double w = 2 * Math.PI * p.testFreq();
        return switch (p.partType()) {
            case CAPACITOR -> new PartModel.Capacitor(v, esr(p), par, d);
            case INDUCTOR -> new PartModel.Inductor(v, d * w * v, par);
            case RESISTOR -> new PartModel.Resistor(v, par, 0);
        };
    }

    /** A capacitor's ESR: the scenario's, spread from part to part when it says so (no random draw otherwise: old lots stay). */
    private double esr(Scenario.Part p) {
        double esr = p.seriesOhm() == null ? 0 : p.seriesOhm();
        return p.seriesSpreadPct() > 0 ? Math.max(0, esr * (1 + p.seriesSpreadPct() * rnd.nextGaussian() / 100)) : esr;
    }

    /** A part of exactly the nominal with the mean loss: the handler's reference part. */
    public PartModel reference() {
        Scenario.Part p = sc.part();
        double w = 2 * Math.PI * p.testFreq(), par = p.parasitic() == null ? 0 : p.parasitic();
        return switch (p.partType()) {
            case CAPACITOR -> new PartModel.Capacitor(p.nominal(), p.seriesOhm() == null ? 0 : p.seriesOhm(), par, p.lossMean());
            case INDUCTOR -> new PartModel.Inductor(p.nominal(), p.lossMean() * w * p.nominal(), par);
            case RESISTOR -> new PartModel.Resistor(p.nominal(), par, 0);
        };
    }

    /** Puts a drawn part on the meter's contacts. */
    public static void present(SimPart part, Contacts contacts) {
        switch (part.state()) {
            case OPEN -> contacts.open();
            case SHORT -> contacts.shortBar();
            case PART -> contacts.load(part.model(), part.intermittent());
        }
    }
}
