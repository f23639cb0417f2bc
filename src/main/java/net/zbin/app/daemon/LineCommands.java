package net.zbin.app.daemon;

import com.fasterxml.jackson.databind.JsonNode;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import net.zbin.core.Impedance;
import java.time.Clock;
import net.zbin.core.Recipe;
import net.zbin.io.meter.MeterSession;
import net.zbin.io.mqtt.Payloads;
import net.zbin.io.mqtt.Publisher;
import net.zbin.io.mqtt.Topics;
import net.zbin.core.SiValue;
import net.zbin.io.ConfigException;
import net.zbin.io.meter.CompensationCapture;
import net.zbin.io.meter.MeterException;
import net.zbin.io.mqtt.PayloadException;
import net.zbin.io.mqtt.TriggerCodec;

/**
 * The engineer's commands (contract, see the README's MQTT table): pause, resume, recipe, lot, reset-counters,
 * compensate. Runs on the measuring thread, so a command takes effect between two parts. Every
 * command with a {@code cmd} gets a {@code command/result}; an unusable one also a {@code rejected}.
 */
final class LineCommands {
    private final Topics topics;
    private final Publisher out;
    private final LineSetup setup;
    private final LineMode mode;
    private final LineStats stats;
    private final TriggerPath path;
    private final MeterSession meter;
    private final Clock clock;

    private final MonitorListener monitor;
    /** Writes the line's state file: a lot or a reset must survive a restart. */
    private final Runnable saveState;

    LineCommands(Topics topics, Publisher out, LineSetup setup, LineMode mode, LineStats stats, TriggerPath path,
                 MeterSession meter, Clock clock, MonitorListener monitor, Runnable saveState) {
        this.monitor = monitor;
        this.saveState = saveState;
        this.topics = topics;
        this.out = out;
        this.setup = setup;
        this.mode = mode;
        this.stats = stats;
        this.path = path;
        this.meter = meter;
        this.clock = clock;
    }

    private void publishResult(String id, String cmd, boolean ok, String message) {
        out.publish(topics.commandResult(), Payloads.commandResult(id, cmd, ok, message), 1, false);
    }

    void handle(byte[] payload) {
        String commandTopic = topics.command();
        JsonNode n;
        String cmd, id;
        try {
            n = TriggerCodec.object(payload);
            cmd = TriggerCodec.text(n, "cmd");
            id = TriggerCodec.text(n, "id");
            if (cmd == null) throw new PayloadException("cmd is missing");
        } catch (PayloadException e) {
            path.reject(commandTopic, e.getMessage());
            return;
        }
        try {
            publishResult(id, cmd, true, run(cmd, n));
        } catch (PayloadException e) {
            path.reject(commandTopic, e.getMessage());
            publishResult(id, cmd, false, e.getMessage());
        } catch (ConfigException | CompensationCapture.ImplausibleException | MeterException | java.io.IOException e) {
            publishResult(id, cmd, false, e.getMessage());
        }
    }

    private String run(String cmd, JsonNode n) throws PayloadException, ConfigException, MeterException,
            CompensationCapture.ImplausibleException, java.io.IOException {
        switch (cmd) {
            case "pause":
                mode.setOperatorPaused(true);
                return "paused";
            case "resume":
                mode.setOperatorPaused(false);
                return "resumed; mode " + mode.mode().key();
            case "recipe":
                String done = setup.switchRecipe(TriggerCodec.text(n, "name"));
                monitor.recipe(setup.recipe(), setup.compensation(), setup.stepCompensations());
                mode.publishState();
                return done;
            case "lot": {
                String l = TriggerCodec.text(n, "lot");
                if (l == null) throw new PayloadException("lot is missing");
                path.enterLot(l, clock.instant());
                saveState.run();
                return "lot " + l;
            }
            case "reset-counters":
                stats.reset();
                saveState.run();
                return "counters reset";
            case "compensate":
                return compensate(n);
            case "acknowledge":
                return acknowledge(n);
            default:
                throw new PayloadException("unknown cmd '" + cmd + "' (pause, resume, recipe, lot, reset-counters, compensate, acknowledge)");
        }
    }

    /**
     * Runs one command given by a person at the status page (on the measuring thread, like any command); {@code by}
     * is the signed-in operator, never taken from the request. The result is also published on command/result.
     */
    String fromPage(String by, String cmd, String alarm, String note) throws PayloadException {
        var n = net.zbin.io.Json.object().put("cmd", cmd).put("by", by);
        if (alarm != null) n.put("alarm", alarm);
        if (note != null) n.put("note", note);
        try {
            String done = run(cmd, n);
            org.slf4j.LoggerFactory.getLogger(LineCommands.class).info("status page: {} by {}: {}", cmd, by, done);
            publishResult(null, cmd, true, done + " (from the status page by " + by + ")");
            return done;
        } catch (ConfigException | CompensationCapture.ImplausibleException | MeterException | java.io.IOException e) {
            throw new PayloadException(e.getMessage());
        }
    }

    /** {"cmd":"acknowledge","alarm":CODE,"by":WHO,"note":TEXT}: the alarm stays until it clears, now acknowledged. */
    private String acknowledge(JsonNode n) throws PayloadException {
        String code = TriggerCodec.text(n, "alarm"), by = TriggerCodec.text(n, "by"), note = TriggerCodec.text(n, "note");
        if (code == null) throw new PayloadException("alarm is missing (the code of an active alarm, e.g. value-drift)");
        if (by == null || by.isBlank()) throw new PayloadException("by is missing (who acknowledges)");
        if (by.length() > 64) throw new PayloadException("by is longer than 64 characters");
        if (note != null && note.length() > 500) throw new PayloadException("note is longer than 500 characters");
        net.zbin.core.AlarmCode c;
        try {
            c = net.zbin.core.AlarmCode.parse(code);
            return mode.acknowledge(c, by.strip(), note == null ? "" : note.strip());
        } catch (IllegalArgumentException e) {
            throw new PayloadException(e.getMessage());
        }
    }

    private String compensate(JsonNode n) throws PayloadException, ConfigException, MeterException,
            CompensationCapture.ImplausibleException, java.io.IOException {
        String kind = TriggerCodec.text(n, "kind");
        CompensationCapture.Kind k;
        try {
            k = CompensationCapture.Kind.valueOf(kind == null ? "" : kind.toUpperCase(Locale.ROOT));
        } catch (IllegalArgumentException e) {
            throw new PayloadException("kind must be open, short or load (was '" + kind + "')");
        }
        Recipe r = setup.recipe();
        List<Impedance> std = new ArrayList<>();
        if (k == CompensationCapture.Kind.LOAD) {
            JsonNode sr = n.get("std_r"), sx = n.get("std_x");
            if (sr == null || !sr.isNumber()) throw new PayloadException("std_r (number, ohm) is required for load");
            std.add(new Impedance(r.freqHz(), sr.asDouble(), sx != null && sx.isNumber() ? sx.asDouble() : 0));
        }
        // open and short at the value step's conditions and at every later step's (a load standard is given for the first)
        List<net.zbin.core.TestConditions> conds = new ArrayList<>(List.of(r.test()));
        if (k != CompensationCapture.Kind.LOAD) for (net.zbin.core.TestStep st : r.steps()) conds.add(st.test());
        List<Impedance> got = setup.capture(meter, clock, k, conds, std);
        Impedance z = got.get(0);
        monitor.compensation(setup.compensation(), setup.stepCompensations());
        StringBuilder more = new StringBuilder();
        for (int i = 1; i < got.size(); i++)
            more.append("; at ").append(SiValue.format(got.get(i).freqHz(), "Hz")).append(": ").append(CompensationCapture.describe(k, got.get(i)));
        return kind + " captured at " + SiValue.format(z.freqHz(), "Hz") + ": " + CompensationCapture.describe(k, z) + more;
    }
}
