package net.zbin.app;

import io.prometheus.metrics.core.metrics.CounterWithCallback;
import io.prometheus.metrics.core.metrics.GaugeWithCallback;
import io.prometheus.metrics.exporter.httpserver.HTTPServer;
import io.prometheus.metrics.model.registry.PrometheusRegistry;
import java.time.Duration;
import java.time.Instant;

/** The historian's own status for Prometheus: rows stored, backlog and lag per line, database errors. */
final class HistorianMetrics implements AutoCloseable {
    private final HTTPServer server;
    private final String url;

    private HistorianMetrics(HTTPServer server, String url) {
        this.server = server;
        this.url = url;
    }

    static HistorianMetrics start(Historian h, String listen) throws java.io.IOException {
        var at = net.zbin.io.HostPort.parse(listen);
        PrometheusRegistry r = new PrometheusRegistry();
        CounterWithCallback.builder().name("zbin_historian_rows_stored").help("Rows written into the database").labelNames("line")
                .callback(cb -> h.figures.forEach((l, f) -> cb.call(f.stored.get(), l))).register(r);
        CounterWithCallback.builder().name("zbin_historian_rows_refused").help("Rows the database refused (logged with file and line)")
                .labelNames("line").callback(cb -> h.figures.forEach((l, f) -> cb.call(f.refused.get(), l))).register(r);
        GaugeWithCallback.builder().name("zbin_historian_backlog_bytes").help("Bytes of the line's files not yet in the database")
                .labelNames("line").callback(cb -> h.figures.forEach((l, f) -> cb.call(f.backlogBytes, l))).register(r);
        GaugeWithCallback.builder().name("zbin_historian_lag_seconds").help("Age of the line's last row stored").labelNames("line")
                .callback(cb -> h.figures.forEach((l, f) -> {
                    if (f.lastRowTime != null) cb.call(Duration.between(f.lastRowTime, Instant.now()).toMillis() / 1000.0, l);
                })).register(r);
        CounterWithCallback.builder().name("zbin_historian_database_errors").help("Database failures waited out")
                .callback(cb -> cb.call(h.dbErrors.get())).register(r);
        HTTPServer s = HTTPServer.builder().hostname(at.host()).port(at.port()).registry(r).buildAndStart();
        return new HistorianMetrics(s, "http://" + at.host() + ":" + s.getPort() + "/metrics");
    }

    String url() { return url; }

    @Override
    public void close() { server.close(); }
}
