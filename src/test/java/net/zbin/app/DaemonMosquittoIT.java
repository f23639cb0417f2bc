package net.zbin.app;

import java.nio.file.Files;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;

/** The daemon end to end through a Mosquitto process this test starts on a free port. */
class DaemonMosquittoIT extends DaemonEndToEndContract {
    static MosquittoProcess broker;

    @BeforeAll
    static void up() throws Exception { broker = new MosquittoProcess(Files.createTempDirectory("mosquitto"), ""); }

    @AfterAll
    static void down() throws Exception { broker.close(); }

    @Override
    String broker() { return broker.url(); }
}
