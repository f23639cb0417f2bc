package net.zbin.io;

import com.fasterxml.jackson.databind.node.ObjectNode;
import java.util.List;
import java.util.function.Function;
import net.zbin.core.Decision;
import net.zbin.core.DecisionEvent;
import net.zbin.core.Grading;

/**
 * The fields of a decision, described once: each drives the MQTT decision payload, the record-log
 * header and the record-log row (contract, see the README's MQTT table and record log section). Record
 * columns come in this order and new ones are only ever appended at the end of the record part; a test
 * holds the order against the published list.
 */
public final class DecisionFields {
    private DecisionFields() {}

    private static Grading g(DecisionEvent e) { return e.decision().grading(); }

    /** Where a field goes. */
    enum Use { RECORD, PAYLOAD, BOTH }

    /**
     * @param name  column and JSON key
     * @param use   record log, payload or both
     * @param value String, Long, Integer, Double (non-finite → empty/null), Boolean, or null
     * @param text  free text from outside (a trigger, a recipe): written spreadsheet-safe in the record log
     */
    record Field(String name, Use use, Function<DecisionEvent, Object> value, boolean text) {
        Field(String name, Use use, Function<DecisionEvent, Object> value) { this(name, use, value, false); }
    }


    static final List<Field> ALL = List.of(
            new Field("time", Use.RECORD, e -> e.time().toString()),
            new Field("line", Use.RECORD, DecisionEvent::line, true),
            new Field("lot", Use.BOTH, e -> e.decision().lot(), true),
            new Field("seq", Use.BOTH, e -> e.decision().seq() >= 0 ? (Object) e.decision().seq() : null),
            new Field("part", Use.BOTH, e -> e.decision().part(), true),
            new Field("kind", Use.BOTH, e -> e.decision().kind().key()),
            new Field("recipe", Use.BOTH, e -> e.decision().recipe(), true),
            new Field("freq_hz", Use.BOTH, e -> g(e).freqHz()),
            new Field("r_ohm", Use.BOTH, e -> g(e).rOhm()),
            new Field("x_ohm", Use.BOTH, e -> g(e).xOhm()),
            new Field("raw_r_ohm", Use.BOTH, e -> g(e).rawROhm()),
            new Field("raw_x_ohm", Use.BOTH, e -> g(e).rawXOhm()),
            new Field("model", Use.BOTH, e -> g(e).model() == null ? null : g(e).model().key()),
            new Field("param", Use.BOTH, e -> g(e).param() == null ? null : g(e).param().label()),
            new Field("value", Use.BOTH, e -> g(e).value()),
            new Field("dev_pct", Use.BOTH, e -> g(e).devPct()),
            new Field("d", Use.BOTH, e -> g(e).d()),
            new Field("q", Use.BOTH, e -> g(e).q()),
            new Field("esr_ohm", Use.BOTH, e -> g(e).esrOhm()),
            new Field("theta_deg", Use.BOTH, e -> g(e).thetaDeg()),
            new Field("bin", Use.BOTH, e -> g(e).bin()),
            new Field("grade", Use.BOTH, e -> g(e).grade(), true),
            new Field("verdict", Use.BOTH, e -> g(e).verdict().key()),
            new Field("reason", Use.BOTH, e -> g(e).reason().code()),
            new Field("latency_ms", Use.BOTH, e -> e.decision().latencyMs()),
            new Field("comp", Use.BOTH, e -> g(e).comp().key()),
            new Field("attempt", Use.BOTH, e -> e.decision().attempt()),
            // appended (the log's columns only ever grow at the end): how many readings the value is the mean of
            new Field("readings", Use.BOTH, e -> g(e).readings() > 0 ? (Object) g(e).readings() : null),
            // appended: the readings of the plan's later steps (JSON; empty for a one-step plan)
            new Field("steps", Use.BOTH, e -> StepsJson.encode(g(e).steps())),
            // payload only
            new Field("unit", Use.PAYLOAD, e -> g(e).unit()),
            new Field("z_ohm", Use.PAYLOAD, e -> g(e).zOhm()),
            new Field("repeat", Use.PAYLOAD, e -> e.decision().repeat()));

    /**
     * The payload's fields and the row's, each in order, as arrays walked by index: a loop over {@link #ALL} that skips
     * the other use's fields let the compiler hoist a check on the row's index out of the loop on the strength of its
     * profile, and in a fresh process that check failed for the first few rows it compiled (four deoptimisations of
     * the measuring thread in a row, the JIT's log of a start shows), each running that part's record write and publish
     * in the interpreter.
     */
    private static final Field[] PAYLOAD_FIELDS = ALL.stream().filter(f -> f.use() != Use.RECORD).toArray(Field[]::new),
            ROW_FIELDS = ALL.stream().filter(f -> f.use() != Use.PAYLOAD).toArray(Field[]::new);

    /** The record-log columns, in order. */
    public static final List<String> COLUMNS = java.util.Arrays.stream(ROW_FIELDS).map(Field::name).toList();

    /** The record-log columns that hold free text, written through {@link SpreadsheetSafe}. */
    public static final java.util.Set<String> TEXT_COLUMNS = java.util.Arrays.stream(ROW_FIELDS).filter(Field::text)
            .map(Field::name).collect(java.util.stream.Collectors.toUnmodifiableSet());

    /** The decision payload. */
    public static ObjectNode json(Decision d) {
        DecisionEvent e = new DecisionEvent(null, null, d);
        ObjectNode n = Json.object();
        for (Field f : PAYLOAD_FIELDS) {
            Object v = f.value().apply(e);
            if (v == null) n.putNull(f.name());
            else if (v instanceof Double x) Json.num(n, f.name(), x);
            else if (v instanceof Long x) n.put(f.name(), x);
            else if (v instanceof Integer x) n.put(f.name(), x);
            else if (v instanceof Boolean x) n.put(f.name(), x);
            else if (v instanceof com.fasterxml.jackson.databind.JsonNode x) n.set(f.name(), x);
            else n.put(f.name(), v.toString());
        }
        return n;
    }

    /** One record-log row, as text per column (empty for absent or non-finite). */
    public static String[] row(DecisionEvent e) {
        Field[] fields = ROW_FIELDS;
        String[] out = new String[fields.length];
        for (int i = 0; i < fields.length; i++) out[i] = cell(fields[i], fields[i].value().apply(e));
        return out;
    }

    private static String cell(Field f, Object v) {
        return v == null ? "" : v instanceof Double x ? (Double.isFinite(x) ? Json.text(x) : "")
                : f.text() ? SpreadsheetSafe.write(v.toString()) : v.toString();
    }
}
