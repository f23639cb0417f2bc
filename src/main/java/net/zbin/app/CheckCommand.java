package net.zbin.app;

import java.nio.file.Path;
import java.util.concurrent.Callable;
import net.zbin.core.Recipe;
import net.zbin.io.RecipeLoader;
import picocli.CommandLine.ArgGroup;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;
import picocli.CommandLine.Spec;
import picocli.CommandLine.Model.CommandSpec;

/** {@code zbin check}: validate a file and print what would run. Exit 2 names file, key and reason. */
@Command(name = "check", mixinStandardHelpOptions = true,
        description = {"Validate a recipe (or a line config) and print what would run.",
                "A problem is reported with the file, the key and what is wrong, and exit code 2."})
public final class CheckCommand implements Callable<Integer> {
    @ArgGroup(exclusive = true, multiplicity = "1")
    Target target;

    static final class Target {
        @Option(names = "--recipe", paramLabel = "FILE", description = "a recipe file") Path recipe;
        @Option(names = "--config", paramLabel = "FILE", description = "a line config file") Path config;
    }

    @Spec
    CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        var out = spec.commandLine().getOut();
        if (target.recipe != null) {
            Recipe r = RecipeLoader.load(target.recipe);
            RecipeText.print(out, r, "fixture defaults; a line config may set its own");
            out.println("ok: " + target.recipe);
            return Main.EXIT_OK;
        }
        return ConfigCheck.print(out, target.config);
    }
}
