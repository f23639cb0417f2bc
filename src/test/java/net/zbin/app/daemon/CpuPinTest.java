package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import net.zbin.app.TestLine;
import net.zbin.io.ConfigException;
import net.zbin.io.LineConfigLoader;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Reading the kernel's CPU lists, and the line config's {@code pin_cpu} (the pinning itself: {@code PinnedLineIT}). */
class CpuPinTest {
    @TempDir
    Path dir;

    @Test
    void cpuList_rangesAndSingles_asTheKernelWritesThem() {
        // the list format of /proc/<pid>/status Cpus_allowed_list (Linux proc(5), "Cpus_allowed_list")
        assertTrue(CpuPin.allows("0-3,6", 0));
        assertTrue(CpuPin.allows("0-3,6", 3));
        assertFalse(CpuPin.allows("0-3,6", 4));
        assertTrue(CpuPin.allows("0-3,6", 6));
        assertFalse(CpuPin.allows("0-3,6", 7));
        assertTrue(CpuPin.allows("1", 1));
        assertFalse(CpuPin.allows("1", 0));
        assertFalse(CpuPin.allows("", 0));
        assertFalse(CpuPin.allows(null, 0));
        assertThrows(IllegalArgumentException.class, () -> CpuPin.allows("0-1-2", 0));
        assertThrows(IllegalArgumentException.class, () -> CpuPin.allows("x", 0));
    }

    @Test
    void theOtherCpus_aListWithoutTheLinesCpu_noneWhenNoneIsLeft() {
        assertEquals("0,1,2,6", CpuPin.without("0-3,6", 3));
        assertEquals("1", CpuPin.without("0-1", 0));
        assertEquals("0,1", CpuPin.without("0-1", 5)); // a CPU not in the list takes nothing away
        assertNull(CpuPin.without("2", 2)); // a process on one CPU: the compiler stays with the line
        assertNull(CpuPin.without("", 0));
        assertNull(CpuPin.without(null, 0));
        assertThrows(IllegalArgumentException.class, () -> CpuPin.without("0-1-2", 0));
    }

    @Test
    void allowedList_readFromAStatusFile() throws Exception {
        Path status = Files.writeString(dir.resolve("status"), "Name:\tjava\nCpus_allowed:\t5\nCpus_allowed_list:\t0,2\nMems_allowed:\t1\n");
        assertEquals("0,2", CpuPin.allowedOf(status));
        assertNull(CpuPin.allowedOf(Files.writeString(dir.resolve("other"), "Name:\tjava\n")));
        assertNull(CpuPin.allowedOf(dir.resolve("missing")));
    }

    @Test
    void devicesServedBy_numberedLinesWithMostOfTheirCountOnTheCpu() {
        // the layout of Linux's /proc/interrupts (Documentation/filesystems/proc.rst, "/proc/interrupts"): a header of the
        // online CPUs, then one line per interrupt with a count per CPU, its chip, and the device's name last
        java.util.List<String> table = java.util.List.of(
                "           CPU0       CPU1       ",
                "  1:          9          0   IO-APIC   1-edge      i8042",
                " 36:          0     252285 PCI-MSIX-0000:00:02.0   1-edge      virtio1-req.0",
                " 37:       4000       5000 PCI-MSIX-0000:00:03.0   0-edge      virtio0-input.0",
                "LOC:    2170348    1841657   Local timer interrupts",
                "RES:    1487827    1904138   Rescheduling interrupts",
                "ERR:          0");
        assertEquals(java.util.Map.of("virtio1-req.0", 252285L, "virtio0-input.0", 5000L), CpuPin.devicesServedBy(table, 1, 1000));
        assertEquals(java.util.Map.of(), CpuPin.devicesServedBy(table, 0, 1000), "4 000 of 9 000 is not most of them; the timer rows are the CPUs' own");
        assertEquals(java.util.Map.of("i8042", 9L), CpuPin.devicesServedBy(table, 0, 0));
        assertEquals(java.util.Map.of(), CpuPin.devicesServedBy(table, 2, 0), "a CPU the table does not list");
        assertEquals(java.util.Map.of(), CpuPin.devicesServedBy(java.util.List.of(), 0, 0));

        assertEquals(0, CpuPin.quietest(table, "0-1"));
        assertEquals(1, CpuPin.quietest(table, "1"), "only CPU 1 allowed");
        assertNull(CpuPin.quietest(table, "2-3"));
        assertNull(CpuPin.interruptWarning(table, "0-1", 0), "the quiet one");
        assertEquals("CPU 1 has served 257285 interrupts of devices so far (most of them [virtio0-input.0, virtio1-req.0]), CPU 0 9"
                + " (/proc/interrupts): a line pinned to CPU 1 waits behind them, on CPU 0 less", CpuPin.interruptWarning(table, "0-1", 1));
        assertNull(CpuPin.interruptWarning(table, "1", 1), "no other CPU to choose");
        java.util.List<String> even = java.util.List.of("           CPU0       CPU1       ",
                " 36:       3000          0 PCI-MSIX-0000:00:02.0   1-edge      virtio1-req.0",
                " 37:          0       2000 PCI-MSIX-0000:00:03.0   0-edge      virtio0-input.0");
        assertNull(CpuPin.interruptWarning(even, "0-1", 0), "3 000 against 2 000 is no clear choice");
    }

    @Test
    void problem_namesTheCpuAndWhatIsAllowed() {
        String here = CpuPin.allowedHere();
        if (here == null) return; // no /proc: nothing to object to, pin() logs and the line runs unpinned
        int first = Integer.parseInt(here.split("[-,]")[0].trim());
        assertNull(CpuPin.problem(first));
        String p = CpuPin.problem(4095);
        if (!CpuPin.allows(here, 4095)) assertEquals("CPU 4095 is not one this process may run on (allowed: " + here + ")", p);
    }

    @Test
    void config_pinCpu_absentIsNone_aNumberIsKept_badValuesNameTheKey() throws Exception {
        assertNull(LineConfigLoader.load(TestLine.write(dir, "a", "tcp://127.0.0.1:1", 1, "")).pinCpu());
        assertEquals(1, LineConfigLoader.load(TestLine.write(dir, "b", "tcp://127.0.0.1:1", 1, "pin_cpu: 1\n")).pinCpu());
        for (String bad : new String[] {"-1", "4096", "1.5", "two"}) {
            ConfigException e = assertThrows(ConfigException.class,
                    () -> LineConfigLoader.load(TestLine.write(dir, "c", "tcp://127.0.0.1:1", 1, "pin_cpu: " + bad + "\n")), bad);
            assertTrue(e.getMessage().contains("pin_cpu") && e.getMessage().contains("c.yaml"), e.getMessage());
        }
    }
}
