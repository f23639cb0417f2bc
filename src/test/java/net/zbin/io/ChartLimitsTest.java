package net.zbin.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import net.zbin.core.ChartDesign;
import net.zbin.core.MonitorSettings;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** A line's solved chart limits come back after a restart, and only while they still meet the budget. */
class ChartLimitsTest {
    @TempDir
    Path dir;

    /** Settings no other test designs (designs are remembered per process). */
    static MonitorSettings settings(double alarmsPerShift) {
        return MonitorSettings.DEFAULT.toBuilder().falseAlarmsPerShift(alarmsPerShift).build();
    }

    @Test
    void keptLimits_areTakenBackAtTheNextStart_withoutASolve() {
        MonitorSettings s = settings(0.71);
        ChartDesign solved = ChartDesign.designed(s);
        ChartLimits.keep(dir, "l1", s, solved);
        assertFalse(ChartDesign.known(s));
        assertTrue(ChartLimits.recall(dir, "l1", s));
        assertEquals(solved, s.design(), "the design taken back is the one solved");
        assertFalse(ChartLimits.recall(dir, "l2", settings(0.72)), "another line's file is not this one's");
    }

    @Test
    void limitsThatMissTheBudget_orAnUnreadableFile_costASolve_neverAWrongLimit() throws Exception {
        MonitorSettings s = settings(0.73);
        ChartDesign solved = ChartDesign.designed(s);
        var edited = new ChartDesign(solved.k(), solved.h() * 0.9, solved.lambda(), solved.limitL(), true, true, solved.pointsPerShift(),
                solved.learnedPoints(), solved.cusumArl0(), solved.ewmaArl0(), solved.falseAlarmsPerShift(), solved.shiftPoint(),
                solved.cusumArlShift(), solved.ewmaArlShift());
        ChartLimits.keep(dir, "l1", s, edited);
        assertFalse(ChartLimits.recall(dir, "l1", s), "an h 10 % low is refused");
        assertFalse(ChartDesign.known(s));
        Files.writeString(ChartLimits.file(dir, "l1"), "{\"designs\": [ {\"settings\": ");
        assertFalse(ChartLimits.recall(dir, "l1", s), "a cut file is read as none");
        assertEquals(solved, s.design(), "designed afresh");
    }

    @Test
    void keep_holdsTheLatestSettingsFirst_upToItsBound() throws Exception {
        ChartDesign any = ChartDesign.designed(settings(0.74));
        for (int i = 0; i < ChartLimits.KEPT + 3; i++) ChartLimits.keep(dir, "l1", settings(1 + i), any);
        var designs = Json.mapper().readTree(ChartLimits.file(dir, "l1").toFile()).path("designs");
        assertEquals(ChartLimits.KEPT, designs.size());
        assertEquals(ChartDesign.key(settings(1 + ChartLimits.KEPT + 2)).toString(), designs.get(0).path("settings").asText());
        ChartLimits.keep(dir, "l1", settings(1 + ChartLimits.KEPT), any); // kept again: moves to the front, not twice
        designs = Json.mapper().readTree(ChartLimits.file(dir, "l1").toFile()).path("designs");
        assertEquals(ChartLimits.KEPT, designs.size());
        assertEquals(ChartDesign.key(settings(1 + ChartLimits.KEPT)).toString(), designs.get(0).path("settings").asText());
    }
}
