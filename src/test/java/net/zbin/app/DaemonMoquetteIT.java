package net.zbin.app;

import java.nio.file.Files;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;

/** The daemon end to end through embedded Moquette (one broker for the class: its shutdown takes seconds). */
class DaemonMoquetteIT extends DaemonEndToEndContract {
    static EmbeddedBroker broker;

    @BeforeAll
    static void up() throws Exception { broker = new EmbeddedBroker(Files.createTempDirectory("moquette")); }

    @AfterAll
    static void down() { broker.close(); }

    @Override
    String broker() { return broker.url(); }
}
