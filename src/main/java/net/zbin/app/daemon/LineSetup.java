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
    private CompensationStore store;
    private Compensation comp;

    LineSetup(LineConfig cfg) throws ConfigException {
        this.cfg = cfg;
        this.recipe = load(cfg.activeRecipe());
        this.store = CompensationStore.load(cfg.stateDir());
        this.comp = store.forFrequency(recipe.freqHz());
    }

    private Recipe load(String name) throws ConfigException {
        return RecipeLoader.load(cfg.recipeDir().resolve(name + ".yaml")).withFixture(cfg.bounds());
    }

    Recipe recipe() { return recipe; }

    /** Compensation at the active recipe's frequency (measuring thread). */
    Compensation compensation() { return comp; }

    /** Loads a recipe by name from the recipe folder and makes it active. */
    String switchRecipe(String name) throws PayloadException, ConfigException {
        if (name == null) throw new PayloadException("name is missing");
        if (!name.matches("[A-Za-z0-9][A-Za-z0-9._-]{0,63}")) throw new PayloadException("name is not a recipe id: '" + name + "'");
        Path f = cfg.recipeDir().resolve(name + ".yaml");
        if (!Files.exists(f)) throw new PayloadException("no recipe '" + name + "' in " + cfg.recipeDir());
        recipe = load(name);
        comp = store.forFrequency(recipe.freqHz());
        return "recipe " + name;
    }

    /** Captures compensation through the line's meter at the active recipe's conditions. */
    List<Impedance> capture(MeterSession meter, Clock clock, CompensationCapture.Kind k, List<TestConditions> conds, List<Impedance> std)
            throws ConfigException, MeterException, CompensationCapture.ImplausibleException, IOException {
        List<Impedance> got = new CompensationCapture(meter, cfg.fixture(), clock).capture(k, conds, std, store);
        store = CompensationStore.load(cfg.stateDir());
        comp = store.forFrequency(recipe.freqHz());
        return got;
    }
}
