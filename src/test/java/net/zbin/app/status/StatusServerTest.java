package net.zbin.app.status;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CopyOnWriteArrayList;
import net.zbin.io.Operators;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

/** The status server on a loopback port, spoken to as a browser and as a careless or hostile client would. */
class StatusServerTest {
    static final String TOKEN = "ana-token-0123456789";
    final HttpClient http = HttpClient.newHttpClient();
    final List<String> acted = new CopyOnWriteArrayList<>();
    StatusServer server;
    Boards boards;

    StatusServer start(boolean operators) throws Exception {
        boards = Boards.of("l1", Clock.systemUTC());
        boards.heard("l1", Boards.Kind.DASHBOARD, "{\"line\":\"l1\",\"lot\":\"A1\",\"mode\":\"ready\",\"online\":true,\"parts\":10,\"passed\":9,\"yield_pct\":90.0,\"at\":\"2026-12-01T08:00:00Z\"}".getBytes(StandardCharsets.UTF_8));
        boards.heard("l1", Boards.Kind.ALARM, "{\"code\":\"value-drift\",\"severity\":\"warning\",\"active\":true,\"message\":\"Cs drifted\",\"since\":\"2026-12-01T08:00:00Z\"}".getBytes(StandardCharsets.UTF_8));
        PageActions actions = (who, action, alarm, note) -> {
            if ("no-such".equals(alarm)) throw new PageActions.Refused("alarm no-such is not active");
            acted.add(who + ":" + action + ":" + alarm + ":" + note);
            return action + " done";
        };
        server = StatusServer.start(boards, new StatusServer.Options("127.0.0.1", 0, null,
                operators ? Operators.of(Map.of("ana", TOKEN)) : null, operators ? actions : null, null));
        return server;
    }

    @AfterEach
    void stop() {
        if (server != null) server.close();
    }

    String url(String path) { return "http://127.0.0.1:" + server.port() + path; }

    HttpResponse<String> get(String path) throws Exception {
        return http.send(HttpRequest.newBuilder(URI.create(url(path))).build(), HttpResponse.BodyHandlers.ofString());
    }

    HttpResponse<String> post(String path, String token, String type, String body) throws Exception {
        var b = HttpRequest.newBuilder(URI.create(url(path))).POST(HttpRequest.BodyPublishers.ofString(body));
        if (token != null) b.header("Authorization", "Bearer " + token);
        if (type != null) b.header("Content-Type", type);
        return http.send(b.build(), HttpResponse.BodyHandlers.ofString());
    }

    static void noStackTrace(HttpResponse<String> r) {
        assertFalse(r.body().contains("Exception") || r.body().contains("\tat ") || r.body().contains(".java:"), r.body());
    }

    @Test
    void pagesAndAssets_areServedFromTheJar_withAStrictContentPolicy() throws Exception {
        start(false);
        HttpResponse<String> page = get("/line/l1");
        assertEquals(200, page.statusCode());
        assertTrue(page.headers().firstValue("Content-Security-Policy").orElse("").contains("default-src 'none'"));
        assertFalse(page.body().contains("http://") || page.body().contains("https://"), "no external address in the page");
        for (String a : List.of("zbin.css", "charts.js", "line.js", "plant.js", "icon.svg")) {
            HttpResponse<String> r = get("/assets/" + a);
            assertEquals(200, r.statusCode(), a);
            assertFalse(r.body().contains("https://") || r.body().contains("http://") && !r.body().contains("http://www.w3.org/2000/svg"),
                    a + " fetches nothing from elsewhere");
        }
        assertEquals(302, http.send(HttpRequest.newBuilder(URI.create(url("/"))).build(), HttpResponse.BodyHandlers.ofString()).statusCode());
        var view = net.zbin.io.Json.mapper().readTree(get("/api/line/l1").body());
        assertEquals("A1", view.path("dashboard").path("lot").asText());
        assertEquals("value-drift", view.path("alarms").get(0).path("code").asText());
        assertFalse(view.path("actions").asBoolean());
    }

    @Test
    void badRequests_areRefusedWithAReason_neverAStackTrace_andTheServerKeepsServing() throws Exception {
        start(true);
        for (String p : List.of("/nothing", "/line/other-line", "/assets/../pom.xml", "/assets/secret.txt", "/api/line/other/action", "/metrics")) {
            HttpResponse<String> r = get(p);
            assertEquals(404, r.statusCode(), p);
            noStackTrace(r);
        }
        HttpResponse<String> wrongMethod = post("/line/l1", null, null, "");
        assertEquals(405, wrongMethod.statusCode());
        assertEquals("GET, HEAD", wrongMethod.headers().firstValue("Allow").orElse(""));
        assertEquals(405, get("/api/line/l1/action").statusCode());
        assertEquals(414, get("/line/" + "x".repeat(600)).statusCode());
        String bad = raw("GET /line/%zz HTTP/1.1\r\nHost: x\r\nConnection: close\r\n\r\n");
        assertTrue(bad.startsWith("HTTP/1.1 400"), bad);
        HttpResponse<String> big = post("/api/line/l1/action", TOKEN, "application/json", "{\"action\":\"pause\",\"note\":\"" + "n".repeat(5000) + "\"}");
        assertEquals(413, big.statusCode());
        HttpResponse<String> notJson = post("/api/line/l1/action", TOKEN, "application/json", "{pause");
        assertEquals(400, notJson.statusCode());
        noStackTrace(notJson);
        assertEquals(400, post("/api/line/l1/action", TOKEN, "application/json", "[1,2]").statusCode());
        assertEquals(400, post("/api/line/l1/action", TOKEN, "application/json", "{\"action\":\"format-disk\"}").statusCode());
        assertEquals(400, post("/api/line/l1/action", TOKEN, "application/json", "{\"action\":\"acknowledge\"}").statusCode());
        assertEquals(415, post("/api/line/l1/action", TOKEN, "text/plain", "{\"action\":\"pause\"}").statusCode());
        try (var s = new java.net.Socket("127.0.0.1", server.port())) { // not HTTP at all
            s.getOutputStream().write("\u0000\u0001 garbage\r\n\r\n".getBytes(StandardCharsets.ISO_8859_1));
            s.getOutputStream().flush();
            s.setSoTimeout(5000);
            s.getInputStream().readAllBytes();
        } catch (java.io.IOException e) {
            // the server closed it, as it may
        }
        assertEquals(200, get("/line/l1").statusCode(), "still serving");
        assertTrue(acted.isEmpty(), "none of that acted: " + acted);
    }

    @Test
    void actions_needAKnownOperatorToken_fromThisSite_andNameTheOperatorFromTheFile() throws Exception {
        start(true);
        HttpResponse<String> none = post("/api/line/l1/action", null, "application/json", "{\"action\":\"pause\"}");
        assertEquals(401, none.statusCode());
        assertTrue(none.headers().firstValue("WWW-Authenticate").isPresent());
        assertEquals(401, post("/api/line/l1/action", "wrong-token-0123456789", "application/json", "{\"action\":\"pause\"}").statusCode());
        HttpResponse<String> crossSite = http.send(HttpRequest.newBuilder(URI.create(url("/api/line/l1/action")))
                .header("Authorization", "Bearer " + TOKEN).header("Content-Type", "application/json").header("Origin", "http://evil.example")
                .POST(HttpRequest.BodyPublishers.ofString("{\"action\":\"pause\"}")).build(), HttpResponse.BodyHandlers.ofString());
        assertEquals(403, crossSite.statusCode());
        assertTrue(acted.isEmpty());
        HttpResponse<String> ok = post("/api/line/l1/action", TOKEN, "application/json",
                "{\"action\":\"acknowledge\",\"alarm\":\"value-drift\",\"note\":\"seen\",\"by\":\"mallory\"}");
        assertEquals(200, ok.statusCode(), ok.body());
        assertEquals(List.of("ana:acknowledge:value-drift:seen"), acted, "the operator is the token's, never the request's 'by'");
        HttpResponse<String> refused = post("/api/line/l1/action", TOKEN, "application/json", "{\"action\":\"acknowledge\",\"alarm\":\"no-such\"}");
        assertEquals(409, refused.statusCode());
        assertTrue(refused.body().contains("not active"), refused.body());
        var who = http.send(HttpRequest.newBuilder(URI.create(url("/api/whoami"))).header("Authorization", "Bearer " + TOKEN).build(),
                HttpResponse.BodyHandlers.ofString());
        assertTrue(who.body().contains("\"who\":\"ana\""), who.body());
    }

    @Test
    void aReadOnlyPage_refusesEveryAction() throws Exception {
        start(false);
        HttpResponse<String> r = post("/api/line/l1/action", TOKEN, "application/json", "{\"action\":\"pause\"}");
        assertEquals(403, r.statusCode());
        assertTrue(r.body().contains("read-only"));
    }

    @Test
    void theEventStream_sendsTheViewNow_andAgainAtEveryChange() throws Exception {
        start(false);
        HttpResponse<java.io.InputStream> r = http.send(HttpRequest.newBuilder(URI.create(url("/events/line/l1"))).build(),
                HttpResponse.BodyHandlers.ofInputStream());
        assertEquals("text/event-stream; charset=utf-8", r.headers().firstValue("Content-Type").orElse(""));
        try (BufferedReader in = new BufferedReader(new InputStreamReader(r.body(), StandardCharsets.UTF_8))) {
            String first = nextData(in);
            assertTrue(first.contains("\"lot\":\"A1\""), first);
            boards.heard("l1", Boards.Kind.DASHBOARD, "{\"line\":\"l1\",\"lot\":\"B2\",\"mode\":\"ready\",\"online\":true}".getBytes(StandardCharsets.UTF_8));
            String second = nextData(in);
            assertTrue(second.contains("\"lot\":\"B2\""), second);
            boards.heard("l1", Boards.Kind.ALARM, "{\"code\":\"value-drift\",\"active\":false}".getBytes(StandardCharsets.UTF_8));
            String third = nextData(in);
            assertTrue(third.contains("\"alarms\":[]"), "a cleared alarm leaves the page at once: " + third);
        }
    }

    @Test
    void withTls_thePageIsServedOverHttpsOnly(@org.junit.jupiter.api.io.TempDir java.nio.file.Path dir) throws Exception {
        java.nio.file.Path cert = dir.resolve("page.pem"), key = dir.resolve("page.key");
        Process p = new ProcessBuilder("openssl", "req", "-x509", "-newkey", "ec", "-pkeyopt", "ec_paramgen_curve:prime256v1", "-nodes",
                "-keyout", key.toString(), "-out", cert.toString(), "-days", "2", "-subj", "/CN=127.0.0.1", "-addext", "subjectAltName=IP:127.0.0.1")
                .redirectErrorStream(true).start();
        String made = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertEquals(0, p.waitFor(), made);
        assertEquals(null, net.zbin.io.mqtt.TlsFiles.keyProblem(key), "openssl wrote a PKCS#8 key");
        boards = Boards.of("l1", Clock.systemUTC());
        server = StatusServer.start(boards, new StatusServer.Options("127.0.0.1", 0, net.zbin.io.mqtt.TlsFiles.context(cert, cert, key),
                Operators.of(Map.of("ana", TOKEN)), (who, action, alarm, note) -> "done", null));
        assertTrue(server.url().startsWith("https://127.0.0.1:"), server.url());
        HttpClient tls = HttpClient.newBuilder().sslContext(net.zbin.io.mqtt.TlsFiles.context(cert, null, null)).build();
        String https = "https://127.0.0.1:" + server.port();
        assertEquals(200, tls.send(HttpRequest.newBuilder(URI.create(https + "/line/l1")).build(), HttpResponse.BodyHandlers.ofString()).statusCode());
        HttpResponse<String> acted = tls.send(HttpRequest.newBuilder(URI.create(https + "/api/line/l1/action")).header("Authorization", "Bearer " + TOKEN)
                .header("Content-Type", "application/json").POST(HttpRequest.BodyPublishers.ofString("{\"action\":\"pause\"}")).build(),
                HttpResponse.BodyHandlers.ofString());
        assertEquals(200, acted.statusCode(), acted.body());
        org.junit.jupiter.api.Assertions.assertThrows(java.io.IOException.class,
                () -> http.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + "/line/l1")).build(), HttpResponse.BodyHandlers.ofString()),
                "plain HTTP gets no page from the HTTPS port");
    }

    /** Sends bytes as they are (a client library refuses to send a malformed request) and returns the answer. */
    String raw(String request) throws Exception {
        try (var s = new java.net.Socket("127.0.0.1", server.port())) {
            s.setSoTimeout(5000);
            s.getOutputStream().write(request.getBytes(StandardCharsets.ISO_8859_1));
            s.getOutputStream().flush();
            return new String(s.getInputStream().readAllBytes(), StandardCharsets.ISO_8859_1);
        }
    }

    static String nextData(BufferedReader in) throws java.io.IOException {
        for (String l; (l = in.readLine()) != null; ) if (l.startsWith("data: ")) return l.substring(6);
        throw new AssertionError("the stream ended");
    }
}
