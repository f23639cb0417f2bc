package net.zbin.app.daemon;

import com.fasterxml.jackson.databind.JsonNode;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import net.zbin.core.Impedance;
import net.zbin.core.Recipe;
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
    private final Daemon line;

    LineCommands(Daemon line) { this.line = line; }

    void handle(byte[] payload) {
        String commandTopic = line.topics().command();
        JsonNode n;
        String cmd, id;
        try {
            n = TriggerCodec.object(payload);
            cmd = TriggerCodec.text(n, "cmd");
            id = TriggerCodec.text(n, "id");
            if (cmd == null) throw new PayloadException("cmd is missing");
        } catch (PayloadException e) {
            line.reject(commandTopic, e.getMessage());
            return;
        }
        try {
            line.publishResult(id, cmd, true, run(cmd, n));
        } catch (PayloadException e) {
            line.reject(commandTopic, e.getMessage());
            line.publishResult(id, cmd, false, e.getMessage());
        } catch (ConfigException | CompensationCapture.ImplausibleException | MeterException | java.io.IOException e) {
            line.publishResult(id, cmd, false, e.getMessage());
        }
    }

    private String run(String cmd, JsonNode n) throws PayloadException, ConfigException, MeterException,
            CompensationCapture.ImplausibleException, java.io.IOException {
        switch (cmd) {
            case "pause":
                line.setOperatorPaused(true);
                return "paused";
            case "resume":
                line.setOperatorPaused(false);
                return "resumed; mode " + line.mode().key();
            case "recipe":
                return line.switchRecipe(TriggerCodec.text(n, "name"));
            case "lot": {
                String l = TriggerCodec.text(n, "lot");
                if (l == null) throw new PayloadException("lot is missing");
                line.setLot(l);
                return "lot " + l;
            }
            case "reset-counters":
                line.resetCounters();
                return "counters reset";
            case "compensate":
                return compensate(n);
            default:
                throw new PayloadException("unknown cmd '" + cmd + "' (pause, resume, recipe, lot, reset-counters, compensate)");
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
        Recipe r = line.recipe();
        List<Impedance> std = new ArrayList<>();
        if (k == CompensationCapture.Kind.LOAD) {
            JsonNode sr = n.get("std_r"), sx = n.get("std_x");
            if (sr == null || !sr.isNumber()) throw new PayloadException("std_r (number, ohm) is required for load");
            std.add(new Impedance(r.freqHz(), sr.asDouble(), sx != null && sx.isNumber() ? sx.asDouble() : 0));
        }
        Impedance z = line.capture(k, List.of(r.test()), std).get(0);
        return kind + " captured at " + SiValue.format(z.freqHz(), "Hz") + ": " + CompensationCapture.describe(k, z);
    }
}
