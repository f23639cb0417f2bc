package net.zbin.app.daemon;

import java.time.Instant;
import net.zbin.core.Compensation;
import net.zbin.core.Decision;
import net.zbin.core.Grading;
import net.zbin.core.Reading;
import net.zbin.core.Recipe;
import net.zbin.core.Trigger;
import net.zbin.io.DecisionFields;
import net.zbin.core.FixtureCheck;
import net.zbin.core.LineEngine;
import net.zbin.io.Json;
import net.zbin.io.RecordLog;
import net.zbin.io.mqtt.PayloadException;
import net.zbin.io.mqtt.Payloads;
import net.zbin.io.mqtt.TriggerCodec;
import org.HdrHistogram.Histogram;

/**
 * Runs the decision path on invented triggers and readings before the line says it is ready — class loading
 * and JIT of the trigger decoder, grading, the line monitor, the latency histogram, and the decision's JSON and
 * record-row encodings, a lot change every 64 parts and the dashboard's encoding — so the first real part of a
 * shift, and the first of each new lot, is answered inside the handler's deadline. Nothing it computes leaves this
 * class (the engine, its monitor, the figures and the histogram are scratch copies).
 */
final class Warmup {
    private Warmup() {}

    /**
     * Runs up to {@code rounds} rounds, but no longer than {@code maxMs}: on a loaded machine the line says ready
     * in time rather than after a fixed amount of work. Returns a checksum so the work cannot be optimised away.
     */
    static long run(Recipe r, Compensation comp, int rounds, long maxMs) {
        long end = System.nanoTime() + maxMs * 1_000_000L;
        double ideal = r.idealZOhm(), f = r.freqHz();
        double sign = switch (r.partType()) { case CAPACITOR -> -1; case INDUCTOR -> 1; case RESISTOR -> 0; };
        long sum = 0;
        LineEngine engine = new LineEngine(r, r.monitor(), FixtureCheck.Limits.DEFAULT);
        LineStats stats = new LineStats(java.time.Clock.systemUTC(), 150);
        Histogram latency = new Histogram(60_000_000L, 2);
        com.fasterxml.jackson.databind.node.ObjectNode trigger = Json.object();
        for (int i = 0; i < rounds && (i % 256 != 0 || System.nanoTime() < end); i++) {
            String lot = "warm-up-" + (i / 64) % 2;
            trigger.put("seq", i).put("part", "W" + i).put("lot", lot).put("kind", "part");
            try {
                sum += TriggerCodec.decode(Payloads.bytes(trigger)).seq();
            } catch (PayloadException e) {
                throw new IllegalStateException("warm-up trigger refused: " + e.getMessage(), e);
            }
            double dev = ((i * 7919) % 400 - 200) / 1000.0;
            double z = ideal * (1 + dev);
            Reading rd = sign == 0 ? new Reading(f, z, z * 1e-4) : new Reading(f, z * 0.01, sign * z);
            Grading g = engine.session(Trigger.Kind.PART, comp, i % 2).offer(rd, false);
            Decision d = new Decision(i, "warm-up", lot, Trigger.Kind.PART, r.name(), g, 0.1, false, i % 2);
            if (i % 64 == 0) { // a lot change: the finished lot's dashboard, then new figures
                sum += DashboardJson.encode(new LineSnapshot(Instant.EPOCH, "warm-up", r.name(), Mode.READY, stats.snapshot(),
                        engine.snapshot(Instant.EPOCH), java.util.Map.of(), 0, 0, 0, "up", 150)).size();
                stats.startLot(lot, Instant.EPOCH);
            }
            sum += engine.observe(d).size();
            stats.decided(new net.zbin.core.DecisionEvent(Instant.EPOCH, "warm-up", d));
            latency.recordValue(100 + i % 1000);
            sum += Payloads.bytes(DecisionFields.json(d)).length;
            sum += RecordLog.encode(new net.zbin.core.DecisionEvent(Instant.EPOCH, "warm-up", d)).length;
        }
        return sum + latency.getTotalCount();
    }
}
