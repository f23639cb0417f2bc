package net.zbin.app.status;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import com.sun.net.httpserver.HttpExchange;
import com.sun.net.httpserver.HttpServer;
import com.sun.net.httpserver.HttpsConfigurator;
import com.sun.net.httpserver.HttpsServer;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.net.InetSocketAddress;
import java.net.URLDecoder;
import java.nio.charset.StandardCharsets;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.SynchronousQueue;
import java.util.concurrent.ThreadPoolExecutor;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import javax.net.ssl.SSLContext;
import net.zbin.io.Json;
import net.zbin.io.Operators;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The status pages, their live event streams, the actions of signed-in operators and {@code /metrics}, on the JDK's
 * own HTTP server: nothing to add to the jar, a small surface, and server-sent events need no more than a response
 * that stays open. Its threads are its own; it reads only the {@link Boards} (copies of the line's messages) and the
 * metrics' snapshot, never what the measuring thread uses, and a slow browser holds only its own stream's thread.
 *
 * <p>Every request is bounded (path length, body size, streams at once); anything unknown is 404, a wrong method 405,
 * and an error never shows a stack trace.
 */
public final class StatusServer implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(StatusServer.class);
    static final int MAX_PATH = 512, MAX_BODY = 4096, MAX_STREAMS = 64;
    /** An open stream sends a comment this often, so proxies and the browser know it is alive. */
    static final long KEEPALIVE_MS = 15_000;
    private static final Map<String, String> ASSETS = Map.of(
            "zbin.css", "text/css; charset=utf-8",
            "charts.js", "text/javascript; charset=utf-8",
            "line.js", "text/javascript; charset=utf-8",
            "plant.js", "text/javascript; charset=utf-8",
            "icon.svg", "image/svg+xml");
    private static final String CSP = "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self'; connect-src 'self'; "
            + "base-uri 'none'; form-action 'none'; frame-ancestors 'none'";

    /**
     * @param host      address to bind
     * @param port      0: any free port
     * @param tls       HTTPS with this context, or null: plain HTTP
     * @param operators who may act, or null: read-only
     * @param actions   what acting does, or null: read-only
     * @param metrics   the registry {@code /metrics} exposes, or null: no metrics here
     */
    public record Options(String host, int port, SSLContext tls, Operators operators, PageActions actions,
                          io.prometheus.metrics.model.registry.PrometheusRegistry metrics) {}

    private final Boards boards;
    private final Options opt;
    private final HttpServer server;
    private final ThreadPoolExecutor pool;
    private final AtomicInteger streams = new AtomicInteger();
    private final io.prometheus.metrics.exporter.httpserver.MetricsHandler metricsHandler;

    private StatusServer(Boards boards, Options opt) throws IOException {
        this.boards = boards;
        this.opt = opt;
        InetSocketAddress at = new InetSocketAddress(opt.host(), opt.port());
        if (opt.tls() != null) {
            HttpsServer s = HttpsServer.create(at, 64);
            s.setHttpsConfigurator(new HttpsConfigurator(opt.tls()));
            server = s;
        } else server = HttpServer.create(at, 64);
        AtomicInteger n = new AtomicInteger();
        pool = new ThreadPoolExecutor(2, MAX_STREAMS + 16, 30, TimeUnit.SECONDS, new SynchronousQueue<>(), r -> {
            Thread t = new Thread(r, "status-http-" + n.incrementAndGet());
            t.setDaemon(true);
            return t;
        });
        server.setExecutor(pool);
        metricsHandler = opt.metrics() == null ? null : new io.prometheus.metrics.exporter.httpserver.MetricsHandler(opt.metrics());
        server.createContext("/", this::handle);
    }

    public static StatusServer start(Boards boards, Options opt) throws IOException {
        StatusServer s = new StatusServer(boards, opt);
        s.server.start();
        LOG.info("status page on {} ({})", s.url(), opt.actions() != null && opt.operators() != null
                ? "operators may act: " + opt.operators() : "read-only");
        return s;
    }

    public int port() { return server.getAddress().getPort(); }

    /** The address a browser opens (the line's page for a daemon, the overview for a panel). */
    public String url() {
        String host = opt.host().contains(":") ? "[" + opt.host() + "]" : opt.host();
        String line = boards.single();
        return (opt.tls() != null ? "https" : "http") + "://" + host + ":" + port() + (line == null ? "/" : "/line/" + line);
    }

    private boolean canAct() { return opt.actions() != null && opt.operators() != null; }

    private void handle(HttpExchange x) throws IOException {
        try (x) {
            String raw = x.getRequestURI().getRawPath();
            if (raw == null || raw.length() > MAX_PATH) {
                reply(x, 414, "path longer than " + MAX_PATH + " characters");
                return;
            }
            route(x, URLDecoder.decode(raw.replace("+", "%2B"), StandardCharsets.UTF_8), x.getRequestMethod());
        } catch (IllegalArgumentException e) {
            reply(x, 400, "malformed request path");
        } catch (IOException e) {
            LOG.debug("status page: client went away: {}", e.toString());
        } catch (RuntimeException e) {
            LOG.warn("status page: {} {} failed", x.getRequestMethod(), x.getRequestURI(), e);
            try {
                reply(x, 500, "internal error (logged on the line's host)");
            } catch (IOException | RuntimeException ignored) {
                // headers already sent: the connection closes
            }
        }
    }

    private void route(HttpExchange x, String path, String method) throws IOException {
        String[] p = path.split("/", -1); // "", first, second, ...
        String single = boards.single();
        if (path.equals("/metrics")) {
            if (metricsHandler == null) notFound(x);
            else if (get(x, method)) metricsHandler.handle(x);
            return;
        }
        if (path.equals("/") && get(x, method)) {
            if (single != null) {
                x.getResponseHeaders().set("Location", "/line/" + single);
                reply(x, 302, "see /line/" + single);
            } else page(x, "plant.html");
            return;
        }
        if (p.length == 3 && p[1].equals("line") && boards.line(p[2]) != null) {
            if (get(x, method)) page(x, "line.html");
            return;
        }
        if (p.length == 3 && p[1].equals("assets") && ASSETS.containsKey(p[2])) {
            if (get(x, method)) asset(x, p[2]);
            return;
        }
        if (path.equals("/api/lines")) {
            if (get(x, method)) json(x, 200, plant());
            return;
        }
        if (path.equals("/api/whoami")) {
            if (get(x, method)) whoami(x);
            return;
        }
        if (p.length == 4 && p[1].equals("api") && p[2].equals("line") && boards.line(p[3]) != null) {
            if (get(x, method)) json(x, 200, boards.line(p[3]).view(boards.clock().instant(), canAct()));
            return;
        }
        if (p.length == 5 && p[1].equals("api") && p[2].equals("line") && p[4].equals("action") && boards.line(p[3]) != null) {
            if (!method.equals("POST")) {
                x.getResponseHeaders().set("Allow", "POST");
                reply(x, 405, "use POST");
            } else action(x, p[3]);
            return;
        }
        if (path.equals("/events/lines")) {
            if (get(x, method)) stream(x, null);
            return;
        }
        if (p.length == 4 && p[1].equals("events") && p[2].equals("line") && boards.line(p[3]) != null) {
            if (get(x, method)) stream(x, p[3]);
            return;
        }
        notFound(x);
    }

    private ObjectNode plant() {
        ObjectNode n = Json.object();
        var now = boards.clock().instant();
        n.put("at", now.toString());
        var arr = n.putArray("lines");
        for (LineBoard b : boards.all()) arr.add(b.summary(now));
        return n;
    }

    /** Only GET (and HEAD) read; anything else is refused with 405. */
    private static boolean get(HttpExchange x, String method) throws IOException {
        if (method.equals("GET") || method.equals("HEAD")) return true;
        x.getResponseHeaders().set("Allow", "GET, HEAD");
        reply(x, 405, "use GET");
        return false;
    }

    private static void notFound(HttpExchange x) throws IOException { reply(x, 404, "no such page"); }

    private void page(HttpExchange x, String name) throws IOException { resource(x, name, "text/html; charset=utf-8"); }

    private void asset(HttpExchange x, String name) throws IOException { resource(x, name, ASSETS.get(name)); }

    private static void resource(HttpExchange x, String name, String type) throws IOException {
        byte[] body;
        try (InputStream in = StatusServer.class.getResourceAsStream("/zbin-status/" + name)) {
            if (in == null) throw new IllegalStateException("jar lacks /zbin-status/" + name);
            body = in.readAllBytes();
        }
        secure(x);
        x.getResponseHeaders().set("Content-Type", type);
        x.getResponseHeaders().set("Cache-Control", "no-cache");
        send(x, 200, body);
    }

    private static void secure(HttpExchange x) {
        var h = x.getResponseHeaders();
        h.set("Content-Security-Policy", CSP);
        h.set("X-Content-Type-Options", "nosniff");
        h.set("Referrer-Policy", "no-referrer");
    }

    /** Who the bearer token belongs to: the page asks before it shows the operator's controls. */
    private void whoami(HttpExchange x) throws IOException {
        if (!canAct()) {
            json(x, 200, Json.object().put("actions", false));
            return;
        }
        String who = operator(x);
        if (who == null) {
            x.getResponseHeaders().set("WWW-Authenticate", "Bearer realm=\"zbin\"");
            reply(x, 401, "unknown operator token");
            return;
        }
        json(x, 200, Json.object().put("actions", true).put("who", who));
    }

    private String operator(HttpExchange x) {
        String auth = x.getRequestHeaders().getFirst("Authorization");
        if (auth == null || !auth.regionMatches(true, 0, "Bearer ", 0, 7)) return null;
        return opt.operators().who(auth.substring(7).strip());
    }

    /**
     * An operator's action. Safe from cross-site requests: the operator is named by a bearer token in a header, which
     * a browser never adds to a request another site makes (no cookie is used), and a request whose Origin is not this
     * server is refused as well. Every action is logged with who did it.
     */
    private void action(HttpExchange x, String line) throws IOException {
        if (!canAct()) {
            reply(x, 403, "this page is read-only: the line's config names no operators");
            return;
        }
        String origin = x.getRequestHeaders().getFirst("Origin");
        String host = x.getRequestHeaders().getFirst("Host");
        if (origin != null && (host == null || !(origin.equals("http://" + host) || origin.equals("https://" + host)))) {
            LOG.warn("status page: action from origin {} refused (this server is {})", origin, host);
            reply(x, 403, "request from another site refused");
            return;
        }
        String who = operator(x);
        if (who == null) {
            LOG.warn("status page: action with an unknown or missing operator token from {}", x.getRemoteAddress().getAddress().getHostAddress());
            x.getResponseHeaders().set("WWW-Authenticate", "Bearer realm=\"zbin\"");
            reply(x, 401, "sign in: unknown or missing operator token");
            return;
        }
        String type = x.getRequestHeaders().getFirst("Content-Type");
        if (type == null || !type.toLowerCase(Locale.ROOT).startsWith("application/json")) {
            reply(x, 415, "send the action as application/json");
            return;
        }
        byte[] body = x.getRequestBody().readNBytes(MAX_BODY + 1);
        if (body.length > MAX_BODY) {
            reply(x, 413, "body longer than " + MAX_BODY + " bytes");
            return;
        }
        JsonNode n;
        try {
            n = Json.mapper().readTree(body);
        } catch (IOException e) {
            reply(x, 400, "body is not JSON");
            return;
        }
        if (n == null || !n.isObject() || !n.path("action").isTextual()) {
            reply(x, 400, "body must be a JSON object with an action (pause, resume or acknowledge)");
            return;
        }
        String act = n.get("action").asText();
        if (!act.equals("pause") && !act.equals("resume") && !act.equals("acknowledge")) {
            reply(x, 400, "unknown action '" + clip(act) + "' (pause, resume or acknowledge)");
            return;
        }
        String alarm = n.path("alarm").isTextual() ? n.get("alarm").asText() : null;
        String note = n.path("note").isTextual() ? n.get("note").asText() : null;
        if (act.equals("acknowledge") && alarm == null) {
            reply(x, 400, "acknowledge needs the alarm's code");
            return;
        }
        try {
            String done = opt.actions().act(who, act, alarm, note);
            json(x, 200, Json.object().put("ok", true).put("message", done).put("by", who));
        } catch (PageActions.Refused e) {
            json(x, 409, Json.object().put("ok", false).put("error", e.getMessage()));
        }
        LOG.info("status page: {} on line {} by {}", act, line, who);
    }

    private static String clip(String s) { return s.length() > 40 ? s.substring(0, 40) + "…" : s; }

    /**
     * A server-sent event stream: the view now, then again at every change, a comment every {@link #KEEPALIVE_MS}; the
     * browser reconnects by itself (after {@code retry}) when the line's daemon restarts.
     */
    private void stream(HttpExchange x, String line) throws IOException {
        if (streams.incrementAndGet() > MAX_STREAMS) {
            streams.decrementAndGet();
            reply(x, 503, "too many open pages (" + MAX_STREAMS + ")");
            return;
        }
        try {
            secure(x);
            var h = x.getResponseHeaders();
            h.set("Content-Type", "text/event-stream; charset=utf-8");
            h.set("Cache-Control", "no-store");
            x.sendResponseHeaders(200, 0);
            if (x.getRequestMethod().equals("HEAD")) return;
            OutputStream out = x.getResponseBody();
            out.write("retry: 1000\n\n".getBytes(StandardCharsets.US_ASCII));
            long seen = -1;
            while (!boards.closed()) {
                long v = boards.version();
                if (v != seen) {
                    seen = v;
                    out.write(event(line, v));
                } else out.write(": alive\n\n".getBytes(StandardCharsets.US_ASCII));
                out.flush();
                try {
                    boards.awaitNewer(seen, KEEPALIVE_MS);
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                    return;
                }
            }
        } finally {
            streams.decrementAndGet();
        }
    }

    /** The last event written for a page (a line, or "" for the plant): its version and bytes. */
    private record Event(long version, byte[] bytes) {}

    private final java.util.concurrent.ConcurrentHashMap<String, Event> events = new java.util.concurrent.ConcurrentHashMap<>();

    /**
     * The view event of {@code version}, encoded once for all the pages that show it (twenty open pages cost one
     * encoding per change, not twenty).
     */
    private byte[] event(String line, long version) throws IOException {
        String key = line == null ? "" : line;
        Event e = events.get(key);
        if (e != null && e.version() >= version) return e.bytes();
        JsonNode body = line == null ? plant() : boards.line(line).view(boards.clock().instant(), canAct());
        byte[] b = ("event: view\ndata: " + Json.mapper().writeValueAsString(body) + "\n\n").getBytes(StandardCharsets.UTF_8);
        events.merge(key, new Event(version, b), (old, now) -> old.version() >= now.version() ? old : now);
        return b;
    }

    private static void json(HttpExchange x, int code, JsonNode n) throws IOException {
        x.getResponseHeaders().set("Content-Type", "application/json");
        x.getResponseHeaders().set("Cache-Control", "no-store");
        secure(x);
        send(x, code, Json.mapper().writeValueAsBytes(n));
    }

    /** A short plain-text answer for errors and redirects: the reason, never a stack trace. */
    private static void reply(HttpExchange x, int code, String message) throws IOException {
        x.getResponseHeaders().set("Content-Type", "text/plain; charset=utf-8");
        secure(x);
        send(x, code, (message + "\n").getBytes(StandardCharsets.UTF_8));
    }

    private static void send(HttpExchange x, int code, byte[] body) throws IOException {
        boolean head = x.getRequestMethod().equals("HEAD");
        x.sendResponseHeaders(code, head ? -1 : body.length == 0 ? -1 : body.length);
        if (!head && body.length > 0) x.getResponseBody().write(body);
    }

    /** Ends the event streams and stops serving. */
    @Override
    public void close() {
        boards.close();
        server.stop(0);
        pool.shutdownNow();
    }
}
