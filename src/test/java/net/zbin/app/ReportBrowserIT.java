package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.image.BufferedImage;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.logging.Level;
import javax.imageio.ImageIO;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.openqa.selenium.OutputType;
import org.openqa.selenium.chrome.ChromeDriver;
import org.openqa.selenium.logging.LogEntry;
import org.openqa.selenium.logging.LogType;

/**
 * The HTML reports of {@code replay} and {@code tune}, opened in Debian's headless Chromium (driven by
 * Selenium through Debian's chromedriver, never a downloaded one): no console errors, plots that render,
 * and nothing fetched from anywhere.
 */
class ReportBrowserIT {
    static final Path OUT = Path.of("target/report-it");
    static ChromeDriver browser;

    @BeforeAll
    static void open() throws Exception {
        Files.createDirectories(OUT);
        browser = Chromium.open(OUT.resolve("profile"), "1100,2800");
    }

    @AfterAll
    static void close() {
        if (browser != null) browser.quit();
    }

    /** Opens the file, saves a screenshot, and checks the console and the picture. */
    static void look(Path html, String name) throws Exception {
        String text = Files.readString(html);
        assertFalse(text.contains("http:") || text.contains("https:") || text.contains("src=") || text.contains("href=") || text.contains("@import"),
                "self-contained: no external address in " + html);
        browser.get(html.toAbsolutePath().toUri().toString());
        List<LogEntry> console = browser.manage().logs().get(LogType.BROWSER).getAll();
        assertTrue(console.stream().noneMatch(e -> e.getLevel().intValue() >= Level.WARNING.intValue()), "console: " + console);
        Path png = OUT.resolve(name + ".png");
        Files.write(png, browser.getScreenshotAs(OutputType.BYTES));
        BufferedImage img = ImageIO.read(png.toFile());
        Set<Integer> colours = new HashSet<>();
        long inked = 0;
        for (int y = 0; y < img.getHeight(); y += 2)
            for (int x = 0; x < img.getWidth(); x += 2) {
                int rgb = img.getRGB(x, y) & 0xffffff;
                colours.add(rgb);
                if (rgb != 0xffffff) inked++;
            }
        assertTrue(colours.size() > 20, name + ": the plots rendered (" + colours.size() + " colours)");
        assertTrue(inked > img.getWidth() * img.getHeight() / 4 / 50, name + ": not blank (" + inked + " inked samples)");
        assertTrue(browser.findElements(org.openqa.selenium.By.tagName("svg")).size() >= 3, name + ": three plots or more");
    }

    @Test
    void replayReport_opensWithoutConsoleErrors_andItsPlotsRender() throws Exception {
        Path html = OUT.resolve("replay.html");
        Cli c = Cli.run("replay", "--recipe", "config/recipes/mlcc-x7r-100n.yaml", "--in", "simulators/lots/lot-mlcc-100n.csv", "--report", html.toString());
        assertEquals(0, c.exit(), c.err());
        look(html, "replay");
        assertTrue(Files.readString(html).contains("guard"), "limits and guard limits are drawn and labelled");
    }

    @Test
    void tuneReport_opensWithoutConsoleErrors_andItsCurvesRender() throws Exception {
        Path html = OUT.resolve("tune.html");
        Cli c = Cli.run("tune", "--recipe", "config/recipes/mlcc-x7r-100n.yaml", "--in", "simulators/lots/lot-mlcc-100n.csv",
                "--vary", "guard=0:1:0.1", "--vary", "grade.K=8,10", "--target-false-accept", "0.02", "--report", html.toString());
        assertEquals(0, c.exit(), c.err());
        look(html, "tune");
        String text = Files.readString(html);
        assertTrue(text.contains("false accept") && text.contains("recommended: "), "the pick is marked");
        assertTrue(text.contains("false-accept target 0.02 %"), "the target is marked");
        assertTrue(text.contains("(grade.K=8)") && text.contains("(grade.K=10)"), "the legends name the second sweep");
        assertTrue(text.contains("guard (U), % of reading") && text.contains("risk, % of parts finished"), "units on the axes");
    }
}
