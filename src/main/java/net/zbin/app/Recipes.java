package net.zbin.app;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;
import net.zbin.core.FixtureBounds;
import net.zbin.core.Recipe;
import net.zbin.io.ConfigException;
import net.zbin.io.RecipeLoader;

/** The recipes of a recipe folder ({@code *.yaml}), each validated. */
final class Recipes {
    private Recipes() {}

    /** Each recipe on the line's fixture. */
    static List<Recipe> all(Path dir, FixtureBounds fixture) throws ConfigException, IOException {
        List<Recipe> out = new ArrayList<>();
        try (Stream<Path> s = Files.list(dir)) {
            for (Path p : s.filter(p -> p.toString().endsWith(".yaml")).sorted().toList()) out.add(RecipeLoader.load(p).withFixture(fixture));
        }
        return out;
    }
}
