package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import net.zbin.sim.HandlerSim;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;

/**
 * The long soak: the real daemon at line rate for {@code zbin.soak.minutes} (only when given; 60 for the figures
 * in the README) with the broker killed and the meter's server dropped in turn at intervals, a meter that now and
 * then times out, garbles or overloads; the daemon's heap after a full GC, its open files and its threads
 * sampled every {@code zbin.soak.sample.s} seconds. Starts the jar (the bench profile packages it before the benches):
 * {@code mvn -B -Pbench test -Dtest=SoakBench -Dsurefire.failIfNoSpecifiedTests=false -Dzbin.soak.minutes=60}.
 * Results as JSON in target/bench/soak.json.
 */
class SoakBench {
    static final ObjectMapper M = new ObjectMapper().enable(SerializationFeature.INDENT_OUTPUT);
    static final Pattern USED = Pattern.compile("used (\\d+)K");

    @Test
    void lineRateWithPeriodicFaults_memoryFilesAndThreadsStayFlat() throws Exception {
        // not part of the ordinary bench run: it takes as long as it is told, and needs the packaged jar
        Assumptions.assumeTrue(System.getProperty("zbin.soak.minutes") != null, "soak runs only with -Dzbin.soak.minutes=N");
        int minutes = Integer.getInteger("zbin.soak.minutes");
        int sampleS = Integer.getInteger("zbin.soak.sample.s", 30);
        double rate = Double.parseDouble(System.getProperty("zbin.soak.rate", "30"));
        long faultEveryMs = Math.max(60_000, minutes * 60_000L / 12);
        Path dir = Files.createTempDirectory("zbin-soak");
        ObjectNode out = M.createObjectNode();
        ArrayNode samples = out.putArray("samples");
        try (FaultedLine line = new FaultedLine(dir, "soak")) {
            long pid = line.daemonPid();
            HandlerSim h = line.handler(Math.round(rate * minutes * 60), rate);
            ExecutorService run = Executors.newSingleThreadExecutor();
            long t0 = System.nanoTime();
            Future<HandlerSim.Summary> f = run.submit(() -> h.run(p -> { }));
            long nextFault = faultEveryMs, nextSample = 0;
            int faults = 0;
            ArrayNode readyAfter = out.putArray("broker_ready_after_s");
            while (!f.isDone()) {
                long ms = (System.nanoTime() - t0) / 1_000_000;
                if (ms >= nextSample) {
                    samples.add(sample(pid, ms / 1000));
                    System.out.println("soak " + samples.get(samples.size() - 1));
                    nextSample += sampleS * 1000L;
                }
                if (ms >= nextFault) {
                    if (faults++ % 2 == 0) readyAfter.add(line.killBroker());
                    else line.restartMeter();
                    nextFault += faultEveryMs;
                }
                Thread.sleep(200);
            }
            HandlerSim.Summary s = f.get();
            h.close();
            run.shutdown();
            samples.add(sample(pid, (System.nanoTime() - t0) / 1_000_000_000));
            JsonNode dash = line.stop();
            out.put("minutes", minutes).put("rate_per_s", rate).put("parts_finished", s.finished()).put("triggers", s.triggers())
                    .put("missing", s.missing()).put("contradictory", s.contradictory()).put("stale", s.stale())
                    .put("duplicate", s.duplicate()).put("resent", h.resent()).put("broker_kills", line.brokerKills)
                    .put("meter_restarts", line.meterRestarts).put("p50_ms", s.p50Ms()).put("p99_ms", s.p99Ms())
                    .put("yield_pct", dash.path("yield_pct").asDouble());
            out.set("reasons", M.valueToTree(s.reasons()));
            summarize(out, samples);
            Path json = Path.of("target", "bench", "soak.json");
            Files.createDirectories(json.getParent());
            Files.writeString(json, M.writeValueAsString(out));
            System.out.println("soak summary " + out.path("summary"));
            assertEquals(0, s.missing());
            assertEquals(0, s.contradictory());
            assertEquals(0, s.stale());
            assertEquals(0, s.duplicate(), () -> "duplicate: " + s.duplicateAnswers());
            line.checkRecords(dash);
        }
    }

    /** Heap after a full GC (jcmd), open file descriptors and threads (/proc) of the daemon process. */
    static ObjectNode sample(long pid, long atS) throws Exception {
        jcmd(pid, "GC.run");
        Matcher m = USED.matcher(jcmd(pid, "GC.heap_info"));
        ObjectNode n = M.createObjectNode().put("t_s", atS);
        n.put("heap_used_kb", m.find() ? Long.parseLong(m.group(1)) : -1);
        try (var fds = Files.list(Path.of("/proc", Long.toString(pid), "fd"))) {
            n.put("fds", fds.count());
        }
        for (String l : Files.readAllLines(Path.of("/proc", Long.toString(pid), "status"))) {
            if (l.startsWith("Threads:")) n.put("threads", Integer.parseInt(l.substring(8).trim()));
            if (l.startsWith("VmRSS:")) n.put("rss_kb", Long.parseLong(l.replaceAll("\\D", "")));
        }
        return n;
    }

    static String jcmd(long pid, String cmd) throws Exception {
        Process p = new ProcessBuilder("jcmd", Long.toString(pid), cmd).redirectErrorStream(true).start();
        String s = new String(p.getInputStream().readAllBytes());
        p.waitFor(30, TimeUnit.SECONDS);
        return s;
    }

    /** The sample at 5 minutes (or the first) against the last: heap, files, threads. */
    static void summarize(ObjectNode out, ArrayNode samples) {
        JsonNode early = samples.get(0);
        for (JsonNode n : samples) if (n.path("t_s").asLong() <= 300) early = n;
        JsonNode last = samples.get(samples.size() - 1);
        ObjectNode s = out.putObject("summary");
        for (String k : new String[] {"heap_used_kb", "fds", "threads", "rss_kb"}) {
            s.put(k + "_early", early.path(k).asLong()).put(k + "_end", last.path(k).asLong());
        }
        s.put("early_at_s", early.path("t_s").asLong()).put("end_at_s", last.path("t_s").asLong());
    }
}
