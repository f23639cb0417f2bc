package net.zbin.app.daemon;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.List;
import net.zbin.core.Compensation;
import net.zbin.core.Impedance;
import net.zbin.core.Recipe;
import net.zbin.core.TestConditions;
import net.zbin.io.CompensationStore;
import net.zbin.io.ConfigException;
import net.zbin.io.LineConfig;
import net.zbin.io.RecipeLoader;
import net.zbin.io.meter.CompensationCapture;
import net.zbin.io.meter.MeterException;
import net.zbin.io.meter.MeterSession;
import net.zbin.io.mqtt.PayloadException;

/**
 * What the line sorts with: the active recipe (on the line's fixture) and the compensation at its
 * frequency. Changed only on the measuring thread, between parts; the recipe is read by others.
 */
final class LineSetup {
    private final LineConfig cfg;
    private volatile Recipe recipe;
    /** The active recipe as it judges the mean of 1, 2, … readings (measuring thread). */
    private volatile Recipe[] plan;
    private CompensationStore store;
    private Compensation comp;
    /** The compensation file's modification time when it was last read or written here (null: no file). */
    private java.nio.file.attribute.FileTime storeSeen;

    LineSetup(LineConfig cfg) throws ConfigException {
        this.cfg = cfg;
        this.recipe = load(cfg.activeRecipe());
        this.plan = net.zbin.core.PartSession.plan(recipe);
        this.store = CompensationStore.load(cfg.stateDir());
        this.storeSeen = modified();
        this.comp = store.forFrequency(recipe.freqHz());
    }

    private java.nio.file.attribute.FileTime modified() {
        try {
            return Files.getLastModifiedTime(cfg.stateDir().resolve(CompensationStore.FILE));
        } catch (IOException e) {
            return null;
        }
    }

    /**
     * Measuring thread: reads the compensation file again when it changed on disk (edited by hand, or restored from
     * its {@code .prev} copy); true when it did. A file that no longer loads is logged and the one in use kept.
     */
    boolean reloadIfChanged() {
        var now = modified();
        if (java.util.Objects.equals(now, storeSeen)) return false;
        storeSeen = now;
        try {
            store = CompensationStore.load(cfg.stateDir());
        } catch (ConfigException e) {
            org.slf4j.LoggerFactory.getLogger(LineSetup.class).error("compensation file changed but does not load (the one in use is kept): {}",
                    e.getMessage());
            return false;
        }
        comp = store.forFrequency(recipe.freqHz());
        return true;
    }

    private Recipe load(String name) throws ConfigException {
        return RecipeLoader.load(cfg.recipeDir().resolve(name + ".yaml")).withFixture(cfg.bounds());
    }

    Recipe recipe() { return recipe; }

    Recipe[] plan() { return plan; }

    /** Compensation at the active recipe's frequency (measuring thread). */
    Compensation compensation() { return comp; }

    /** The compensation at each later step's frequency of the active plan, in step order (measuring thread). */
    List<Compensation> stepCompensations() {
        List<Compensation> out = new java.util.ArrayList<>();
        for (net.zbin.core.TestStep st : recipe.steps()) out.add(compensationAt(st.test().freqHz()));
        return out;
    }

    /** Compensation at another frequency — a later step's of the plan (measuring thread); null when none is stored. */
    Compensation compensationAt(double freqHz) {
        return comp != null && Compensation.matches(comp.freqHz(), freqHz) ? comp : store.forFrequency(freqHz);
    }

    /** Loads a recipe by name from the recipe folder and makes it active. */
    String switchRecipe(String name) throws PayloadException, ConfigException {
        if (name == null) throw new PayloadException("name is missing");
        if (!name.matches("[A-Za-z0-9][A-Za-z0-9._-]{0,63}")) throw new PayloadException("name is not a recipe id: '" + name + "'");
        Path f = cfg.recipeDir().resolve(name + ".yaml");
        if (!Files.exists(f)) throw new PayloadException("no recipe '" + name + "' in " + cfg.recipeDir());
        Recipe next = load(name);
        plan = net.zbin.core.PartSession.plan(next);
        recipe = next;
        comp = store.forFrequency(recipe.freqHz());
        return "recipe " + name;
    }

    /** Captures compensation through the line's meter at the active recipe's conditions. */
    List<Impedance> capture(MeterSession meter, Clock clock, CompensationCapture.Kind k, List<TestConditions> conds, List<Impedance> std)
            throws ConfigException, MeterException, CompensationCapture.ImplausibleException, IOException {
        store = CompensationStore.load(cfg.stateDir()); // what is on disk now: a capture adds to it, never drops other frequencies
        List<Impedance> got = new CompensationCapture(meter, cfg.fixture(), clock).capture(k, conds, std, store);
        store = CompensationStore.load(cfg.stateDir());
        storeSeen = modified();
        comp = store.forFrequency(recipe.freqHz());
        return got;
    }
}
