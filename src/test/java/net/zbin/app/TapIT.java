package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The tests' MQTT client counts a message where it came. A repeat answer is the same bytes each time it is sent, so a
 * wait that placed a message by {@code indexOf} (its first equal) missed the second one. A loaded run of
 * {@code DaemonRestartIT} waited for 50 answers after a restart and saw 49, which this miss explains when a presentation
 * the handler had re-sent during the run already had that very answer before the mark (the run kept no log to show it).
 */
class TapIT {
    @TempDir
    Path dir;

    @Test
    void aMessageEqualToOneBeforeTheMark_isCountedAfterIt() throws Exception {
        String answer = "{\"seq\":7,\"part\":\"P7\",\"bin\":1,\"repeat\":true}";
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             Tap tap = new Tap(broker.url(), "tap-it/#")) {
            tap.publish("tap-it/decision", answer);
            tap.await(m -> m.topic().equals("tap-it/decision"), 1, 30_000);
            int mark = tap.msgs.size();
            tap.publish("tap-it/decision", answer); // the same bytes again
            tap.publish("tap-it/other", "{}");

            List<Tap.Msg> after = tap.awaitFrom(mark, m -> m.topic().equals("tap-it/decision"), 1, 30_000);
            assertEquals(1, after.size(), "the second, equal message, counted after the mark");
            assertEquals(answer, after.get(0).raw());
            tap.awaitFrom(mark, m -> m.topic().equals("tap-it/other"), 1, 30_000); // both arrived: the count below is final
            assertEquals(2, tap.on("/decision").size());
            // what the earlier pattern saw: the equal message placed at its first occurrence, before the mark
            assertTrue(tap.msgs.indexOf(after.get(0)) < mark, "indexOf finds the earlier equal message");
            assertThrows(AssertionError.class, () -> tap.awaitFrom(mark, m -> m.topic().equals("tap-it/decision"), 2, 200),
                    "a wait for more than came fails, naming what it got");
        }
    }
}
