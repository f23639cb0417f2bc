package net.zbin.app;

import java.nio.file.Path;
import java.util.logging.Level;
import org.openqa.selenium.chrome.ChromeDriver;
import org.openqa.selenium.chrome.ChromeDriverService;
import org.openqa.selenium.chrome.ChromeOptions;
import org.openqa.selenium.logging.LogType;
import org.openqa.selenium.logging.LoggingPreferences;

/** Debian's headless Chromium through Debian's chromedriver (never a downloaded one), with its console kept for the test. */
final class Chromium {
    private Chromium() {}

    static ChromeDriver open(Path profile, String windowSize) {
        ChromeOptions o = new ChromeOptions();
        o.setBinary("/usr/bin/chromium");
        o.addArguments("--headless=new", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
                "--disable-component-update", "--disable-sync", "--window-size=" + windowSize, "--user-data-dir=" + profile.toAbsolutePath());
        LoggingPreferences logs = new LoggingPreferences();
        logs.enable(LogType.BROWSER, Level.ALL);
        o.setCapability("goog:loggingPrefs", logs);
        ChromeDriverService service = new ChromeDriverService.Builder().usingDriverExecutable(new java.io.File("/usr/bin/chromedriver")).build();
        return new ChromeDriver(service, o);
    }
}
