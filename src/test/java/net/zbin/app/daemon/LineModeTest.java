package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.time.Clock;
import java.time.Instant;
import java.time.ZoneOffset;
import net.zbin.io.mqtt.Topics;
import org.junit.jupiter.api.Test;

/** Mode changes, the retained state and the alarms that go with them, without a broker. */
class LineModeTest {
    final Topics topics = new Topics("zbin", "l1");
    final RecordingPublisher out = new RecordingPublisher();

    LineMode mode(boolean pauseOnLogFailure) {
        LineMode m = new LineMode(Clock.fixed(Instant.parse("2026-12-01T08:00:00Z"), ZoneOffset.UTC), topics, pauseOnLogFailure, () -> "r1");
        m.attach(out);
        return m;
    }

    @Test
    void meterLinkDown_faultsTheLine_raisesOneAlarm_andItClearsWhenTheLinkIsBack() {
        LineMode m = mode(true);
        m.publishState();
        m.setLinkDown(true, "connection refused");
        m.setLinkDown(true, "again");
        assertEquals(Mode.FAULT, m.mode());
        m.setLinkDown(false, null);
        m.drain(2000);
        var alarms = out.on(topics.alarm());
        assertEquals(2, alarms.size(), "raised once, cleared once: " + alarms);
        assertTrue(alarms.get(0).payload().contains("\"active\":true") && alarms.get(0).payload().contains("connection refused"));
        assertTrue(alarms.get(1).payload().contains("\"active\":false"));
        var states = out.on(topics.state());
        assertEquals(3, states.size(), states.toString());
        assertTrue(states.get(1).payload().contains("\"mode\":\"fault\"") && states.get(1).retained());
        assertTrue(states.get(2).payload().contains("\"mode\":\"ready\""));
    }

    @Test
    void recordLogFailure_pausesTheLine_onlyWhenConfiguredTo() {
        LineMode pausing = mode(true);
        pausing.setLogFailing(true, "disk full");
        assertEquals(Mode.PAUSED, pausing.mode());
        pausing.setLogFailing(false, null);
        assertEquals(Mode.READY, pausing.mode());
        LineMode continuing = mode(false);
        continuing.setLogFailing(true, "disk full");
        assertEquals(Mode.READY, continuing.mode());
    }

    @Test
    void operatorPause_winsOverFault_andResumeReturnsToWhatTheLinkSays() {
        LineMode m = mode(true);
        m.setLinkDown(true, "gone");
        m.setOperatorPaused(true);
        assertEquals(Mode.PAUSED, m.mode());
        m.setOperatorPaused(false);
        assertEquals(Mode.FAULT, m.mode());
    }

    @Test
    void afterAReconnect_theStateAndEveryActiveAlarmAreSentAgain() {
        LineMode m = mode(true);
        m.setLinkDown(true, "gone");
        m.drain(2000);
        int alarmsBefore = out.on(topics.alarm()).size();
        LineMode again = mode(true);
        again.setLinkDown(true, "gone");
        again.announce();
        again.drain(2000);
        assertEquals(alarmsBefore + 2, out.on(topics.alarm()).size(), "the active alarm is announced again");
    }

    @Test
    void aRecipeChange_clearsTheOldRecipesMonitorAlarms_andKeepsTheLinesOwn() {
        LineMode m = mode(true);
        m.alarm(net.zbin.core.AlarmCode.COMPENSATION_MISSING, true, "no compensation at 1 MHz", true);
        m.alarm(net.zbin.core.AlarmCode.VALUE_DRIFT, true, "drifted", true);
        m.setLinkDown(true, "gone");
        m.clearRecipeBound("recipe changed to r2");
        assertEquals(java.util.Set.of(net.zbin.core.AlarmCode.METER_LINK_DOWN), m.activeAlarms().keySet());
        m.drain(2000);
        assertTrue(out.on(topics.alarm()).stream().filter(a -> a.payload().contains("\"active\":false"))
                .allMatch(a -> a.payload().contains("recipe changed to r2")));
    }

    @Test
    void anAcknowledgedAlarm_staysActiveWithWhoAndNote_isWrittenToTheHistory_andGoesWhenItClears(@org.junit.jupiter.api.io.TempDir java.nio.file.Path dir)
            throws Exception {
        java.nio.file.Path history = dir.resolve("alarms-l1.jsonl");
        LineMode m = new LineMode(Clock.fixed(Instant.parse("2026-12-01T08:00:00Z"), ZoneOffset.UTC), topics, true, () -> "r1",
                java.util.Set.of(), history);
        m.attach(out);
        var code = net.zbin.core.AlarmCode.VALUE_DRIFT;
        org.junit.jupiter.api.Assertions.assertThrows(IllegalArgumentException.class, () -> m.acknowledge(code, "ana", "too early"),
                "only an active alarm can be acknowledged");
        m.alarm(code, true, "Cs drifted +0.3 %", true);
        assertEquals("alarm value-drift acknowledged by ana", m.acknowledge(code, "ana", "fixture cleaned"));
        LineMode.Alarm a = m.activeAlarms().get(code);
        assertEquals("ana", a.ack().by());
        assertEquals("fixture cleaned", a.ack().note());
        assertEquals(Mode.READY, m.mode());
        m.alarm(code, false, "back at its baseline", true);
        m.drain(2000);
        assertTrue(m.activeAlarms().isEmpty());
        var sent = out.on(topics.alarm());
        assertEquals(3, sent.size(), "raised, acknowledged, cleared: " + sent);
        assertTrue(sent.get(1).payload().contains("\"active\":true") && sent.get(1).payload().contains("\"by\":\"ana\""), sent.get(1).payload());
        var lines = java.nio.file.Files.readAllLines(history);
        assertEquals(3, lines.size(), lines.toString());
        assertTrue(lines.get(1).contains("\"acknowledged\"") && lines.get(1).contains("fixture cleaned"), lines.get(1));
    }
}
