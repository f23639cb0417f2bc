package net.zbin.app.daemon;

import org.junit.jupiter.api.Test;

class ScratchLotTimingTest extends TriggerPathTest {
    @Test
    void timing() throws Exception {
        line("mlcc-x7r-100n", java.nio.file.Files.readString(java.nio.file.Path.of("config/recipes/mlcc-x7r-100n.yaml")), "");
        long seq = 0;
        org.HdrHistogram.Histogram normal = new org.HdrHistogram.Histogram(3), first = new org.HdrHistogram.Histogram(3);
        for (int lot = 0; lot < 60; lot++) {
            for (int i = 0; i < 500; i++) {
                meter.reading(1.0);
                long t0 = System.nanoTime();
                trigger("{\"seq\": " + (seq++) + ", \"part\": \"P\", \"lot\": \"L" + lot + "\"}");
                long dt = System.nanoTime() - t0;
                if (lot >= 20) (i == 0 ? first : normal).recordValue(dt);
            }
        }
        System.out.printf("SCRATCH normal p50 %.3f p99 %.3f ms; first of lot p50 %.3f max %.3f ms%n", normal.getValueAtPercentile(50) / 1e6,
                normal.getValueAtPercentile(99) / 1e6, first.getValueAtPercentile(50) / 1e6, first.getMaxValue() / 1e6);
    }
}
