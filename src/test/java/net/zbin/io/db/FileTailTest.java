package net.zbin.io.db;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Set;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Reading a growing record file in complete lines, and the byte-level helpers of the ingest. */
class FileTailTest {
    @TempDir
    Path dir;

    @Test
    void aTornLastLine_isWaitedFor_andReadOnceComplete() throws Exception {
        Path f = dir.resolve("l-2026-12-01.csv");
        Files.writeString(f, "time,line\n2026-12-01T00:00:00Z,l\n2026-12-01T00:00:01Z,");
        assertEquals("time,line", FileTail.firstLine(f));
        FileTail.Chunk c = FileTail.read(f, 10, 100);
        assertEquals(1, c.lines(), "only the complete line");
        assertEquals("2026-12-01T00:00:00Z,l\n", new String(c.bytes(), StandardCharsets.UTF_8));
        assertTrue(FileTail.read(f, c.endOffset(), 100).empty(), "the torn line is not returned");
        Files.writeString(f, "l\n", java.nio.file.StandardOpenOption.APPEND);
        FileTail.Chunk d = FileTail.read(f, c.endOffset(), 100);
        assertEquals("2026-12-01T00:00:01Z,l\n", new String(d.bytes(), StandardCharsets.UTF_8));
        assertEquals(Files.size(f), d.endOffset());
    }

    @Test
    void atMostMaxLines_perChunk() throws Exception {
        Path f = dir.resolve("x.csv");
        Files.writeString(f, "h\na\nb\nc\n");
        FileTail.Chunk c = FileTail.read(f, 2, 2);
        assertEquals(2, c.lines());
        assertEquals("a\nb\n", new String(c.bytes(), StandardCharsets.UTF_8));
        assertEquals(6, c.endOffset());
    }

    @Test
    void longLines_areReadWhole_howeverLongerThanGuessed() throws Exception {
        Path f = dir.resolve("long.csv");
        String line = "x".repeat(200_000) + "\n";
        Files.writeString(f, "h\n" + line + line + "tail-without-newline");
        FileTail.Chunk c = FileTail.read(f, 2, 2);
        assertEquals(2, c.lines());
        assertEquals(2L * line.length(), c.bytes().length);
        assertEquals(2 + 2L * line.length(), c.endOffset());
    }

    @Test
    void numbered_putsTheFileAndLineInFront_quotingTheName() {
        byte[] out = Ingest.numbered("l \"x\".csv", "a,b\nc,d\n".getBytes(StandardCharsets.UTF_8), 7);
        assertEquals("\"l \"\"x\"\".csv\",7,a,b\n\"l \"\"x\"\".csv\",8,c,d\n", new String(out, StandardCharsets.UTF_8));
    }

    @Test
    void escapedText_isFound_whereverACellStartsWithAnApostrophe() {
        assertFalse(Ingest.escapedText("2026-12-01T00:00:00Z,l,LOT-1,3,P'1\n".getBytes(StandardCharsets.UTF_8)), "an apostrophe inside a cell is text");
        assertTrue(Ingest.escapedText("2026-12-01T00:00:00Z,l,'=LOT,3,P1\n".getBytes(StandardCharsets.UTF_8)));
        assertTrue(Ingest.escapedText("2026-12-01T00:00:00Z,l,\"'-a,b\",3\n".getBytes(StandardCharsets.UTF_8)), "quoted because of its comma");
    }

    @Test
    void days_areTheRowsUtcDates() {
        assertEquals(Set.of(java.time.LocalDate.parse("2026-12-01"), java.time.LocalDate.parse("2026-12-02")),
                Ingest.days("2026-12-01T23:59:59Z,a\n2026-12-02T00:00:00Z,b\n".getBytes(StandardCharsets.UTF_8)));
    }

    @Test
    void theStagingInsert_castsNumbers_readsEscapedTextBack_andSkipsWhatIsThere() {
        String sql = Ingest.insertSql(List.of("time", "line", "lot", "seq", "r_ohm", "bin", "steps"));
        assertTrue(sql.contains("nullif(r_ohm, '')::double precision") && sql.contains("nullif(seq, '')::bigint") && sql.contains("nullif(bin, '')::integer"));
        assertTrue(sql.contains("CASE WHEN left(lot, 1) = '''' THEN substr(lot, 2)"), sql);
        assertTrue(sql.endsWith("ON CONFLICT DO NOTHING"));
    }
}
