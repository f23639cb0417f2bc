package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.Locale;
import net.zbin.core.AlarmCode;
import net.zbin.core.MonitorSettings;
import net.zbin.core.Recipe;
import net.zbin.io.RecipeLoader;
import net.zbin.sim.Scenario;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * The drift monitor's false-alarm budget, held against stable simulated lines: over a million parts of each
 * scenario and several seeds (the simulator's lot generator and fixture model, the meter's noise, the real
 * grader and monitor with the shipped recipe), the false drift alarms per 8-hour shift, scaled to the line's
 * rate, must stay within twice the stated budget. The charts are designed for the recipe's stated rate
 * (30 parts/s), so at 10 parts/s a third of the budget is expected.
 */
class StableLineFalseAlarmsTest {
    static final int PARTS_PER_SEED = 1_200_000;

    @ParameterizedTest(name = "{0} with {1}")
    @CsvSource({"harrowgate-c0g-100p-stable, mlcc-c0g-100p", "harrowgate-mlcc-100n, mlcc-x7r-100n"})
    void stableLines_stayWithinTheFalseAlarmBudget_atTheLinesRate(String scenario, String recipeName) throws Exception {
        Scenario sc = Scenario.read(Path.of("simulators/scenarios", scenario + ".yaml"));
        Recipe recipe = RecipeLoader.load(Path.of("config/recipes", recipeName + ".yaml"));
        MonitorSettings m = recipe.monitor();
        long alarms = 0, parts = 0;
        for (long seed = 1; seed <= 3; seed++) {
            alarms += new LeanLine(sc, recipe, seed * 1_000_003).run(PARTS_PER_SEED).raised(AlarmCode.VALUE_DRIFT, AlarmCode.LOSS_DRIFT);
            parts += PARTS_PER_SEED;
        }
        double perShiftAt30 = alarms * (30 * 3600.0 * m.shiftH()) / parts, perShiftAt10 = alarms * (10 * 3600.0 * m.shiftH()) / parts;
        double perShiftAtDesign = alarms * (m.partsPerS() * 3600.0 * m.shiftH()) / parts;
        System.out.printf(Locale.ROOT, "%s: %d false drift alarms in %,d stable parts: %.2f per %.0f h shift at 10 parts/s, %.2f at 30 parts/s"
                        + " (budget %.2f at %.0f parts/s; the design expects %.2f)%n", scenario, alarms, parts, perShiftAt10, m.shiftH(), perShiftAt30,
                m.falseAlarmsPerShift(), m.partsPerS(), m.design().falseAlarmsPerShift());
        assertTrue(perShiftAtDesign <= 2 * m.falseAlarmsPerShift(),
                alarms + " false drift alarms in " + parts + " parts: " + perShiftAtDesign + " per shift, over twice the budget");
    }
}
