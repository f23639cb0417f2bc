package net.zbin.io;

import net.zbin.core.Unit;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.time.Instant;
import java.time.format.DateTimeParseException;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import net.zbin.core.Compensation;
import net.zbin.core.CompensationSource;
import net.zbin.core.Impedance;

/**
 * Fixture compensation per test frequency, kept in {@code <state_dir>/compensation.yaml}: readable
 * and editable by people, written atomically (temp file + rename) so a crash never leaves half a file.
 * Open, short and load are captured separately, each with its own time.
 */
public final class CompensationStore {
    public static final String FILE = "compensation.yaml";

    /** One captured fixture reading. */
    public record Part(Impedance z, Instant takenAt) {}

    /** Everything known at one frequency. Any part may be null. */
    public record Entry(double freqHz, Part open, Part shortZ, Part load, Impedance loadTrue) {
        /** The compensation to apply, dated by its oldest part. */
        public Compensation compensation() {
            Instant oldest = null;
            for (Part p : new Part[] {open, shortZ, load})
                if (p != null && (oldest == null || p.takenAt().isBefore(oldest))) oldest = p.takenAt();
            if (oldest == null) return Compensation.none(freqHz);
            boolean osl = load != null && open != null && shortZ != null;
            return new Compensation(freqHz, CompensationSource.USER, oldest, open == null ? null : open.z(),
                    shortZ == null ? null : shortZ.z(), osl ? load.z() : null, osl ? loadTrue : null);
        }
    }

    private final Path file;
    private final Map<Double, Entry> entries = new TreeMap<>();

    /** Captures put since the store was loaded, written to the capture history at the next {@link #save}. */
    private final List<ObjectNode> captured = new ArrayList<>();

    /** Every capture, one JSON object a line, beside the store: the plant historian follows it. */
    public static final String HISTORY = "compensation-history.jsonl";

    private CompensationStore(Path file) { this.file = file; }

    public Path file() { return file; }

    /** Loads the store of a state folder; a missing file is an empty store. */
    public static CompensationStore load(Path stateDir) throws ConfigException {
        CompensationStore s = new CompensationStore(stateDir.resolve(FILE));
        if (!Files.exists(s.file)) return s;
        SpecNode root = Yaml.read(s.file);
        root.optText("note", null);
        List<Entry> list = root.list("entries", CompensationStore::entry);
        root.finish();
        for (Entry e : list) s.entries.put(e.freqHz(), e);
        return s;
    }

    private static Entry entry(SpecNode n) throws ConfigException {
        double f = n.number("freq_hz", Unit.HERTZ);
        if (!(f > 0)) throw n.error("freq_hz", "must be > 0");
        Part open = part(n, "open", f), shortZ = part(n, "short", f), load = part(n, "load", f);
        Impedance loadTrue = null;
        if (load != null) {
            SpecNode l = n.child("load_standard");
            double r = l.number("r_ohm", Unit.OHM), x = l.number("x_ohm", Unit.OHM);
            l.finish();
            loadTrue = new Impedance(f, r, x);
        }
        n.finish();
        return new Entry(f, open, shortZ, load, loadTrue);
    }

    private static Part part(SpecNode n, String key, double f) throws ConfigException {
        if (!n.has(key)) { n.optText(key, null); return null; }
        SpecNode p = n.child(key);
        double r = p.number("r_ohm", Unit.OHM), x = p.number("x_ohm", Unit.OHM);
        String t = p.text("taken_at");
        p.finish();
        try {
            return new Part(new Impedance(f, r, x), Instant.parse(t));
        } catch (DateTimeParseException e) {
            throw p.error("taken_at", "not an ISO-8601 instant ('" + t + "')");
        }
    }

    public List<Entry> entries() { return Collections.unmodifiableList(new ArrayList<>(entries.values())); }

    /** The compensation for a frequency, or {@link Compensation#none} when nothing was captured there. */
    public Compensation forFrequency(double freqHz) {
        for (Entry e : entries.values()) if (Compensation.matches(e.freqHz(), freqHz)) return e.compensation();
        return Compensation.none(freqHz);
    }

    private Entry entryAt(double freqHz) {
        for (Entry e : entries.values()) if (Compensation.matches(e.freqHz(), freqHz)) return e;
        return new Entry(freqHz, null, null, null, null);
    }

    private void captured(String kind, Impedance z, Instant at) {
        ObjectNode n = Json.object();
        n.put("at", at.toString());
        n.put("kind", kind);
        n.put("freq_hz", z.freqHz());
        n.put("r_ohm", z.rOhm());
        n.put("x_ohm", z.xOhm());
        captured.add(n);
    }

    public void putOpen(Impedance z, Instant at) {
        captured("open", z, at);
        Entry e = entryAt(z.freqHz());
        entries.put(e.freqHz(), new Entry(e.freqHz(), new Part(z, at), e.shortZ(), e.load(), e.loadTrue()));
    }

    public void putShort(Impedance z, Instant at) {
        captured("short", z, at);
        Entry e = entryAt(z.freqHz());
        entries.put(e.freqHz(), new Entry(e.freqHz(), e.open(), new Part(z, at), e.load(), e.loadTrue()));
    }

    public void putLoad(Impedance z, Impedance standard, Instant at) {
        captured("load", z, at);
        Entry e = entryAt(z.freqHz());
        entries.put(e.freqHz(), new Entry(e.freqHz(), e.open(), e.shortZ(), new Part(z, at), standard));
    }

    /** Writes the store atomically; the file it replaces is kept beside it as {@code compensation.yaml.prev}. */
    public void save() throws IOException {
        ObjectNode root = Json.object();
        root.put("note", "fixture compensation captured by zbin compensate; one entry per test frequency");
        ArrayNode list = root.putArray("entries");
        for (Entry e : entries.values()) {
            ObjectNode o = list.addObject();
            o.put("freq_hz", e.freqHz());
            write(o, "open", e.open());
            write(o, "short", e.shortZ());
            write(o, "load", e.load());
            if (e.loadTrue() != null) {
                ObjectNode l = o.putObject("load_standard");
                l.put("r_ohm", e.loadTrue().rOhm());
                l.put("x_ohm", e.loadTrue().xOhm());
            }
        }
        Files.createDirectories(file.getParent());
        Path tmp = file.resolveSibling(FILE + ".tmp");
        Files.write(tmp, Yaml.mapper().writeValueAsBytes(root));
        if (Files.exists(file)) Files.copy(file, file.resolveSibling(FILE + ".prev"), StandardCopyOption.REPLACE_EXISTING);
        Files.move(tmp, file, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
        if (captured.isEmpty()) return;
        StringBuilder b = new StringBuilder();
        for (ObjectNode n : captured) b.append(Json.mapper().writeValueAsString(n)).append('\n');
        Files.writeString(file.resolveSibling(HISTORY), b, java.nio.charset.StandardCharsets.UTF_8, java.nio.file.StandardOpenOption.CREATE,
                java.nio.file.StandardOpenOption.APPEND);
        captured.clear();
    }

    private static void write(ObjectNode o, String key, Part p) {
        if (p == null) return;
        ObjectNode n = o.putObject(key);
        n.put("r_ohm", p.z().rOhm());
        n.put("x_ohm", p.z().xOhm());
        n.put("taken_at", p.takenAt().toString());
    }

}
