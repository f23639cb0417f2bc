package net.zbin.app;

import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.concurrent.atomic.AtomicLong;
import com.fasterxml.jackson.databind.node.ObjectNode;
import net.zbin.io.Json;
import net.zbin.sim.Contacts;
import net.zbin.sim.PartModel;
import net.zbin.sim.Scenario;
import org.HdrHistogram.Histogram;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The status page and {@code /metrics} stay off the trigger path: the line's trigger → decision latency at a handler's
 * pace with no page, beside the same with 20 browsers' event streams open and {@code /metrics} scraped every second —
 * alternated (without, with, …, six rounds) in one run through one Mosquitto, so both halves see the same machine, and
 * each against the floor ({@link BenchFloor}) measured in blocks alternating with the line's; the deadline targets
 * (p50 ≤ floor + 0.2 ms, p99 ≤ 1.5 × floor) are judged against the floor of the rounds without a page.
 * Run with {@code mvn -B -Pbench test -Dtest=StatusBench}; results in {@code target/bench/status.json}.
 */
class StatusBench {
    static final int PACE = LineBench.PACE, SAMPLES = 1500, BLOCKS = 3, ROUNDS = 6, BROWSERS = 20;

    @TempDir
    Path dir;

    @Test
    void thePageAndMetrics_stayOffTheTriggerPath() throws Exception {
        Histogram without = new Histogram(60_000_000_000L, 3), with = new Histogram(60_000_000_000L, 3);
        // The floor without a page, and the floor taken while the page's clients are connected (the page's load on the
        // machine in it): the targets are judged against the first, the stricter.
        Histogram echoWith = new Histogram(60_000_000_000L, 3), meterWith = new Histogram(60_000_000_000L, 3);
        Histogram echoWithout = new Histogram(60_000_000_000L, 3), meterWithout = new Histogram(60_000_000_000L, 3);
        long events = 0, scrapes = 0;
        try (MosquittoProcess broker = new MosquittoProcess(dir, "max_queued_messages 100000\n");
             BenchFloor floor = new BenchFloor(broker.url())) {
            for (int round = 0; round < ROUNDS; round++) {
                boolean page = round % 2 == 1;
                String line = "sb" + round;
                try (LineRig rig = new LineRig(dir, line, broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n",
                        "handler: {deadline_ms: 150}\ndashboard: {interval_s: 1}\n" + (page ? "status: {listen: '127.0.0.1:0'}\n" : ""), null,
                        new Contacts(), LineBench.flushMs())) {
                    rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
                    floor.meterAt(rig.meterServer.port());
                    Map<String, CompletableFuture<Long>> waiting = new ConcurrentHashMap<>();
                    MqttAsyncClient handler = LineBench.client(broker.url(), waiting, "zbin/" + line + "/decision");
                    LineBench.paced(handler, waiting, "zbin/" + line + "/trigger", ", \"part\": \"W\"", 500, PACE, 0);
                    AtomicBoolean stop = new AtomicBoolean();
                    AtomicLong seen = new AtomicLong(), scraped = new AtomicLong();
                    List<Thread> clients = new ArrayList<>();
                    if (page) {
                        String url = rig.daemon.statusUrl();
                        String base = url.substring(0, url.indexOf("/line/"));
                        HttpClient http = HttpClient.newHttpClient();
                        for (int b = 0; b < BROWSERS; b++) clients.add(reader(http, base + "/events/line/" + line, stop, seen));
                        Thread scraper = new Thread(() -> {
                            while (!stop.get()) {
                                try {
                                    http.send(HttpRequest.newBuilder(URI.create(base + "/metrics")).build(), HttpResponse.BodyHandlers.ofString());
                                    scraped.incrementAndGet();
                                    Thread.sleep(1000);
                                } catch (Exception e) {
                                    return;
                                }
                            }
                        }, "bench-scraper");
                        scraper.setDaemon(true);
                        scraper.start();
                        clients.add(scraper);
                        clients.forEach(t -> { if (!t.isAlive()) t.start(); });
                    }
                    // the line and its floor in alternating blocks
                    for (int b = 0; b < BLOCKS; b++) {
                        floor.block(SAMPLES / BLOCKS, page ? echoWith : echoWithout, page ? meterWith : meterWithout);
                        (page ? with : without).add(LineBench.paced(handler, waiting, "zbin/" + line + "/trigger", ", \"part\": \"P\"",
                                SAMPLES / BLOCKS, PACE, 100_000 + b * SAMPLES));
                    }
                    stop.set(true);
                    events += seen.get();
                    scrapes += scraped.get();
                    handler.disconnect().waitForCompletion(5000);
                    handler.close();
                }
            }
        }
        ObjectNode out = Json.object();
        out.put("machine", Runtime.getRuntime().availableProcessors() + " cores, " + System.getProperty("java.vm.name") + " " + System.getProperty("java.version"));
        out.put("pace_per_s", PACE);
        out.set("without_page", LineBench.json(without));
        ObjectNode w = LineBench.json(with);
        w.put("browsers", BROWSERS);
        w.put("events_received", events);
        w.put("metrics_scrapes", scrapes);
        out.set("with_20_browsers_and_metrics_every_1s", w);
        out.put("p50_ratio", (double) with.getValueAtPercentile(50) / without.getValueAtPercentile(50));
        out.put("p99_ratio", (double) with.getValueAtPercentile(99) / without.getValueAtPercentile(99));
        double floorP50 = BenchFloor.ms(echoWithout, meterWithout, 50), floorP99 = BenchFloor.ms(echoWithout, meterWithout, 99);
        out.put("floor_p50_ms", floorP50);
        out.put("floor_p99_ms", floorP99);
        out.put("floor_with_page_clients_p50_ms", BenchFloor.ms(echoWith, meterWith, 50));
        out.put("floor_with_page_clients_p99_ms", BenchFloor.ms(echoWith, meterWith, 99));
        out.put("target_p50_ms", floorP50 + 0.2);
        out.put("target_p99_ms", 1.5 * floorP99);
        Files.createDirectories(Path.of("target/bench"));
        Files.writeString(Path.of("target/bench/status.json"), Json.mapper().writerWithDefaultPrettyPrinter().writeValueAsString(out));
        System.out.printf(Locale.ROOT, "%n  %-52s %9s %9s %9s %9s%n", "trigger -> decision at " + PACE + "/s, ms", "p50", "p99", "p99.9", "max");
        for (var e : new Object[][] {{"no page", without}, {BROWSERS + " event streams + /metrics every second", with}}) {
            Histogram h = (Histogram) e[1];
            System.out.printf(Locale.ROOT, "  %-52s %9.2f %9.2f %9.2f %9.2f%n", e[0], h.getValueAtPercentile(50) / 1e6, h.getValueAtPercentile(99) / 1e6,
                    h.getValueAtPercentile(99.9) / 1e6, h.getMaxValue() / 1e6);
        }
        System.out.printf(Locale.ROOT, "  %d events reached the %d streams, %d scrapes%n", events, BROWSERS, scrapes);
        System.out.printf(Locale.ROOT, "  floor (echo + meter) in the rounds without a page: p50 %.2f, p99 %.2f ms (with the page's clients connected: %.2f, %.2f);"
                        + " targets p50 <= %.2f, p99 <= %.2f%n", floorP50, floorP99, BenchFloor.ms(echoWith, meterWith, 50), BenchFloor.ms(echoWith, meterWith, 99),
                floorP50 + 0.2, 1.5 * floorP99);
        if (events < BROWSERS * 2L) throw new AssertionError("the streams were not served: " + events + " events");
    }

    /** One browser's event stream, read line by line as it comes; counts the views. */
    static Thread reader(HttpClient http, String url, AtomicBoolean stop, AtomicLong seen) {
        Thread t = new Thread(() -> {
            try {
                HttpResponse<java.io.InputStream> r = http.send(HttpRequest.newBuilder(URI.create(url)).build(), HttpResponse.BodyHandlers.ofInputStream());
                try (BufferedReader in = new BufferedReader(new InputStreamReader(r.body(), StandardCharsets.UTF_8))) {
                    for (String l; !stop.get() && (l = in.readLine()) != null; ) if (l.startsWith("event: view")) seen.incrementAndGet();
                }
            } catch (Exception e) {
                // the rig closed
            }
        }, "bench-browser");
        t.setDaemon(true);
        return t;
    }
}
