package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import net.zbin.core.AlarmCode;
import net.zbin.core.Decision;
import net.zbin.core.FixtureCheck;
import net.zbin.core.Grader;
import net.zbin.core.Grading;
import net.zbin.core.LineEngine;
import net.zbin.core.Trigger;
import net.zbin.io.Json;
import net.zbin.sim.Contacts;
import net.zbin.sim.LotGenerator;
import net.zbin.sim.PartModel;
import net.zbin.sim.Scenario;
import org.junit.jupiter.api.Test;

/**
 * The monitor's state taken at any decision, written as JSON, read back and taken up by a fresh engine carries on
 * exactly as the engine it came from: the same alarm changes at every later decision and the same figures at the
 * end — through a learning baseline, a drifting fixture's alarms and a lot change.
 */
class MonitorCarriedAcrossRestartTest {
    /** An engine restored at one decision, and the alarm changes it made from then on. */
    record Twin(long from, LineEngine engine, List<String> changes) {}

    static String text(List<AlarmCode.Change> cs) {
        StringBuilder b = new StringBuilder();
        for (AlarmCode.Change c : cs) b.append(c.code().code()).append(c.active() ? " raised: " : " cleared: ").append(c.message()).append('|');
        return b.toString();
    }

    static LineEngine.State throughJson(LineEngine.State s) throws Exception {
        String once = Json.mapper().writeValueAsString(s);
        LineEngine.State back = Json.mapper().readValue(once, LineEngine.State.class);
        assertTrue(once.equals(Json.mapper().writeValueAsString(back)), "the state's JSON reads back to the same state");
        return back;
    }

    @Test
    void aMonitorRestoredAtAnyDecision_raisesAndClearsAsTheOneItCameFrom() throws Exception {
        Scenario sc = MonitorSimulationTest.scenario("harrowgate-c0g-100p-stable");
        // Parts 3 000–5 999 read 1 % high (a reel of other parts): the value-drift alarm rises and, once they are gone, clears.
        var line = new MonitorSimulationTest.Line(sc, sc.fixture().toFixture(), "mlcc-c0g-100p");
        // A baseline learned from 1 000 parts (the recipe's 10 000 would outlast the first lot): the charts chart in both lots.
        var settings = line.recipe.monitor().toBuilder().learnParts(1_000).build();
        LineEngine original = new LineEngine(line.recipe, settings, FixtureCheck.Limits.DEFAULT);
        original.compensation(line.comp, line.clock.instant());
        List<String> originalChanges = new ArrayList<>();
        List<Twin> twins = new ArrayList<>();
        long seq = 0;
        for (long part = 0; part < 16_000; part++) {
            if (part % 1_500 == 700) { // a cut at a decision: learning, charting, alarm up, after the lot change
                LineEngine t = new LineEngine(line.recipe, settings, FixtureCheck.Limits.DEFAULT);
                t.compensation(line.comp, line.clock.instant());
                t.restore(throughJson(original.state()));
                assertTrue(Json.mapper().writeValueAsString(original.state()).equals(Json.mapper().writeValueAsString(t.state())),
                        "the restored engine holds what it was given, at decision " + seq);
                twins.add(new Twin(seq, t, new ArrayList<>()));
            }
            line.clock.now = line.clock.now.plusMillis(180);
            String lot = part < 9_000 ? "HG-0412" : "HG-0413";
            List<Decision> ds = new ArrayList<>();
            LotGenerator.SimPart p = line.gen.next();
            boolean shifted = part >= 3_000 && part < 6_000;
            if (p.state() == Contacts.State.PART) line.contacts.load(shifted && p.model() instanceof PartModel.Capacitor c
                    ? new PartModel.Capacitor(c.capF() * 1.01, c.esrOhm(), c.eslH(), c.tanDelta()) : p.model(), 0);
            else LotGenerator.present(p, line.contacts);
            ds.add(decision(seq++, lot, Trigger.Kind.PART, Grader.grade(line.recipe, line.read(), line.comp, 1), line));
            if (part % 250 == 249) {
                line.contacts.open();
                ds.add(decision(seq++, lot, Trigger.Kind.OPEN, FixtureCheck.open(line.recipe, line.read(), line.comp, FixtureCheck.Limits.DEFAULT), line));
                line.contacts.shortBar();
                ds.add(decision(seq++, lot, Trigger.Kind.SHORT, FixtureCheck.shortBar(line.recipe, line.read(), line.comp, FixtureCheck.Limits.DEFAULT), line));
                line.contacts.load(line.gen.reference(), 0);
                ds.add(decision(seq++, lot, Trigger.Kind.REFERENCE, FixtureCheck.reference(line.recipe, line.read(), line.comp, 0), line));
            }
            for (Decision d : ds) {
                originalChanges.add(d.seq() + ":" + text(original.observe(d)));
                for (Twin t : twins) t.changes().add(d.seq() + ":" + text(t.engine().observe(d)));
            }
        }
        List<String> codes = new ArrayList<>();
        for (String c : originalChanges) for (String one : c.substring(c.indexOf(':') + 1).split("\\|")) if (!one.isEmpty()) codes.add(one.replaceAll(": .*", ""));
        for (String code : List.of("value-drift raised", "value-drift cleared"))
            assertTrue(codes.contains(code), "the run has " + code + " to carry across: " + codes);
        assertTrue(twins.size() >= 10, "cuts: " + twins.size());
        for (Twin t : twins) {
            List<String> tail = originalChanges.subList((int) t.from(), originalChanges.size());
            assertEquals(tail, t.changes(), "alarm changes after a restore at decision " + t.from());
            assertTrue(original.snapshot(line.clock.instant()).equals(t.engine().snapshot(line.clock.instant())), "figures after a restore at decision " + t.from());
            assertTrue(Json.mapper().writeValueAsString(original.state()).equals(Json.mapper().writeValueAsString(t.engine().state())),
                    "state after a restore at decision " + t.from());
        }
    }

    static Decision decision(long seq, String lot, Trigger.Kind kind, Grading g, MonitorSimulationTest.Line line) {
        return new Decision(seq, "P" + seq, lot, kind, line.recipe.name(), g, 1, false, 0);
    }
}
