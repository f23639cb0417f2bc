package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import net.zbin.sim.HandlerSim;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Every fault in one run through Mosquitto and the real {@code zbin run} process: the broker killed, the
 * daemon killed with SIGKILL, the meter's server dropped and restarted, and a meter that now and then times
 * out, garbles, overloads, sends a stray line or a late reply — checked by the handler simulator's accounting and the record log.
 */
class CombinedFaultsIT {
    @TempDir
    Path dir;

    @Test
    void brokerDaemonAndMeterFaultsInOneRun_everyTriggerAnsweredOnce_noContradiction_noPassFromAFault_logComplete() throws Exception {
        try (FaultedLine line = new FaultedLine(dir, "faults")) {
            HandlerSim h = line.handler(3000, 60);
            ExecutorService run = Executors.newSingleThreadExecutor();
            java.util.concurrent.atomic.AtomicLong parts = new java.util.concurrent.atomic.AtomicLong();
            Future<HandlerSim.Summary> f = run.submit(() -> h.run(p -> parts.set(p.parts())));
            List<String> timeline = new ArrayList<>();
            // The faults come after counts of parts, not after seconds: on a loaded machine the run is slower, not different.
            long at = 0;
            for (int round = 0; round < 2; round++) {
                TestLine.awaitParts(parts, at += 240, f);
                timeline.add("broker killed at part " + parts.get() + ": online again after " + Math.round(line.killBroker() * 1000) + " ms");
                TestLine.awaitParts(parts, at += 240, f);
                timeline.add("daemon kill -9 at part " + parts.get() + ": online again after " + Math.round(line.killDaemon() * 1000) + " ms");
                TestLine.awaitParts(parts, at += 240, f);
                line.restartMeter();
                timeline.add("meter server restarted at part " + parts.get());
            }
            HandlerSim.Summary s = f.get(5, TimeUnit.MINUTES);
            h.close();
            run.shutdown();
            JsonNode dash = line.stop();
            System.out.println("combined faults: " + timeline + "; " + s.finished() + " parts finished, " + h.resent()
                    + " triggers resent, reasons " + s.reasons());
            assertEquals(0, s.missing(), "every trigger answered, after the handler's retry where needed");
            assertEquals(0, s.contradictory(), "a repeat never carries another bin");
            assertEquals(0, s.stale(), "no answer about another part");
            assertEquals(0, s.duplicate(), () -> "no presentation answered twice as new: " + s.duplicateAnswers());
            assertEquals(0, s.passedOnOpenOrShort(), "no pass for a part on open or shorted contacts: every graded reading was its own");
            assertTrue(s.reasons().getOrDefault("open-contact", 0L) > 0, "open contacts were presented (else the line above proved nothing)");
            assertEquals(s.finished(), dash.path("parts").asLong(), "the dashboard counted the parts the handler finished");
            line.checkRecords(dash);
        }
    }
}
