package net.zbin.app.daemon;

import io.prometheus.metrics.model.registry.MultiCollector;
import io.prometheus.metrics.model.snapshots.ClassicHistogramBuckets;
import io.prometheus.metrics.model.snapshots.CounterSnapshot;
import io.prometheus.metrics.model.snapshots.GaugeSnapshot;
import io.prometheus.metrics.model.snapshots.HistogramSnapshot;
import io.prometheus.metrics.model.snapshots.Labels;
import io.prometheus.metrics.model.snapshots.MetricSnapshots;
import io.prometheus.metrics.model.snapshots.Unit;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.function.Supplier;
import net.zbin.core.BinTally;

/**
 * The line's figures for Prometheus, read at each scrape from the latest {@link LineSnapshot} — the same one the
 * dashboard topic encodes, so a scrape and the dashboard agree, and a scrape never touches what the measuring thread
 * uses. Names and units follow Prometheus conventions: counters end in {@code _total}, durations are seconds,
 * shares are ratios 0..1.
 */
final class LineMetrics implements MultiCollector {
    private final Supplier<LineSnapshot> latest;

    LineMetrics(Supplier<LineSnapshot> latest) { this.latest = latest; }

    @Override
    public MetricSnapshots collect() {
        LineSnapshot s = latest.get();
        if (s == null) return MetricSnapshots.builder().build();
        String line = s.line();
        LineStats.Snapshot st = s.stats();
        BinTally.Snapshot total = st.total(), lot = st.lotTally();
        List<io.prometheus.metrics.model.snapshots.MetricSnapshot> out = new ArrayList<>();

        var parts = CounterSnapshot.builder().name("zbin_parts").help("Parts finished since the daemon started, by bin, grade and verdict");
        for (BinTally.BinCount c : total.bins())
            parts.dataPoint(CounterSnapshot.CounterDataPointSnapshot.builder().labels(Labels.of("line", line, "bin", Integer.toString(c.bin()),
                    "grade", c.grade(), "verdict", c.verdict().name().toLowerCase(Locale.ROOT))).value(c.count()).build());
        out.add(parts.build());
        out.add(byReason("zbin_decisions", "Final decisions since the daemon started, by reason", line, total.reasons()));
        out.add(byReason("zbin_retests", "Interim (retest) answers since the daemon started, by reason", line, total.retestReasons()));
        out.add(CounterSnapshot.builder().name("zbin_fixture_checks").help("Open, short and reference check presentations, by result")
                .dataPoint(counter(Labels.of("line", line, "result", "pass"), total.checksPassed()))
                .dataPoint(counter(Labels.of("line", line, "result", "fail"), total.checks() - total.checksPassed())).build());
        out.add(CounterSnapshot.builder().name("zbin_late_decisions").help("Decisions later than the handler's deadline")
                .dataPoint(counter(Labels.of("line", line), st.late())).build());
        out.add(CounterSnapshot.builder().name("zbin_messages_rejected").help("Unusable MQTT messages refused (not parts)")
                .dataPoint(counter(Labels.of("line", line), st.rejected())).build());
        out.add(CounterSnapshot.builder().name("zbin_record_dropped_rows").help("Record rows dropped beyond the memory bound while the log could not be written")
                .dataPoint(counter(Labels.of("line", line), s.recordDropped())).build());

        var yield = GaugeSnapshot.builder().name("zbin_yield_ratio").help("Pass share of finished parts: the lot, the last 10 minutes, the last hour");
        gaugeIfFinite(yield, Labels.of("line", line, "window", "lot"), lot.parts() == 0 ? Double.NaN : (double) lot.passed() / lot.parts());
        gaugeIfFinite(yield, Labels.of("line", line, "window", "10m"), ratio(st.window10Min()));
        gaugeIfFinite(yield, Labels.of("line", line, "window", "1h"), ratio(st.windowHour()));
        out.add(yield.build());
        var ci = GaugeSnapshot.builder().name("zbin_lot_yield_interval_ratio").help("Wilson 95 % interval of the lot's yield");
        gaugeIfFinite(ci, Labels.of("line", line, "bound", "low"), st.yieldLowPct() / 100);
        gaugeIfFinite(ci, Labels.of("line", line, "bound", "high"), st.yieldHighPct() / 100);
        out.add(ci.build());
        out.add(gauge("zbin_lot_parts", "Parts finished in the lot (since it started or since reset-counters)", Labels.of("line", line), lot.parts()));
        out.add(gauge("zbin_parts_per_hour", "Throughput: parts finished in the last minute, times 60", Labels.of("line", line), st.uphMinute()));

        var mode = GaugeSnapshot.builder().name("zbin_mode").help("The line's mode: 1 for the mode it is in, 0 for the others");
        for (Mode m : Mode.values()) mode.dataPoint(gaugePoint(Labels.of("line", line, "mode", m.key()), m == s.mode() ? 1 : 0));
        out.add(mode.build());
        out.add(gauge("zbin_meter_link_up", "1 while the meter answers and took the test conditions", Labels.of("line", line), "up".equals(s.meterLink()) ? 1 : 0));
        var alarms = GaugeSnapshot.builder().name("zbin_alarm_active").help("Active alarms, 1 each, with their severity and whether acknowledged");
        for (LineMode.Alarm a : s.alarms().values())
            alarms.dataPoint(gaugePoint(Labels.of("line", line, "code", a.code().code(), "severity", a.code().severity().key(),
                    "acknowledged", Boolean.toString(a.ack() != null)), 1));
        out.add(alarms.build());
        out.add(gauge("zbin_alarms_active", "Number of active alarms", Labels.of("line", line), s.alarms().size()));
        var age = GaugeSnapshot.builder().name("zbin_compensation_age_seconds").help("Age of the open/short compensation in force");
        gaugeIfFinite(age, Labels.of("line", line), s.monitor().compAgeH() * 3600);
        out.add(age.build());
        out.add(gauge("zbin_mqtt_outbox_messages", "Messages waiting for the broker (outbox depth)", Labels.of("line", line), s.mqttBuffered()));
        out.add(gauge("zbin_record_backlog_rows", "Record rows kept in memory because the log could not be written", Labels.of("line", line), s.recordBacklog()));
        out.add(GaugeSnapshot.builder().name("zbin_deadline_seconds").help("The handler's deadline per decision").unit(Unit.SECONDS)
                .dataPoint(gaugePoint(Labels.of("line", line), s.deadlineMs() / 1000.0)).build());
        out.add(gauge("zbin_line_info", "The line's recipe and lot, as labels", Labels.of("line", line, "recipe", s.recipe(), "lot", st.lot()), 1));
        out.add(latency(line, st.latency()));
        return new MetricSnapshots(out);
    }

    private static HistogramSnapshot latency(String line, LineStats.Latency l) {
        int n = l.upperMs().size();
        double[] upper = new double[n + 1];
        long[] counts = new long[n + 1];
        for (int i = 0; i < n; i++) {
            upper[i] = l.upperMs().get(i) / 1000.0;
            counts[i] = l.counts().get(i);
        }
        upper[n] = Double.POSITIVE_INFINITY;
        counts[n] = l.counts().get(n);
        return HistogramSnapshot.builder().name("zbin_decision_latency_seconds").help("Trigger to decision, as the handler waits for it")
                .dataPoint(HistogramSnapshot.HistogramDataPointSnapshot.builder().classicHistogramBuckets(ClassicHistogramBuckets.of(upper, counts))
                        .sum(l.sumMs() / 1000.0).labels(Labels.of("line", line)).build()).build();
    }

    private static CounterSnapshot byReason(String name, String help, String line, java.util.Map<net.zbin.core.Reason, Long> reasons) {
        var b = CounterSnapshot.builder().name(name).help(help);
        reasons.forEach((r, n) -> b.dataPoint(counter(Labels.of("line", line, "reason", r.code()), n)));
        return b.build();
    }

    private static double ratio(LineStats.Window w) { return w.parts() == 0 ? Double.NaN : (double) w.passed() / w.parts(); }

    private static CounterSnapshot.CounterDataPointSnapshot counter(Labels l, double v) {
        return CounterSnapshot.CounterDataPointSnapshot.builder().labels(l).value(v).build();
    }

    private static GaugeSnapshot.GaugeDataPointSnapshot gaugePoint(Labels l, double v) {
        return GaugeSnapshot.GaugeDataPointSnapshot.builder().labels(l).value(v).build();
    }

    private static GaugeSnapshot gauge(String name, String help, Labels l, double v) {
        return GaugeSnapshot.builder().name(name).help(help).dataPoint(gaugePoint(l, v)).build();
    }

    /** A share not yet defined (no parts) is left out rather than exported as NaN. */
    private static void gaugeIfFinite(GaugeSnapshot.Builder b, Labels l, double v) {
        if (Double.isFinite(v)) b.dataPoint(gaugePoint(l, v));
    }
}
