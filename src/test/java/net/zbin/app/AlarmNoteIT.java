package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Clock;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CopyOnWriteArrayList;
import net.zbin.app.status.Boards;
import net.zbin.app.status.PageActions;
import net.zbin.app.status.StatusServer;
import net.zbin.io.Operators;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.openqa.selenium.By;
import org.openqa.selenium.Keys;
import org.openqa.selenium.chrome.ChromeDriver;

/**
 * An operator typing a note for one alarm keeps the text and the focus when another alarm of the line changes meanwhile
 * (the list is redrawn): the real status server, fed alarm messages by the test, and Debian's Chromium.
 */
class AlarmNoteIT {
    static final String TOKEN = "ana-token-0123456789";

    @TempDir
    Path dir;
    ChromeDriver browser;
    StatusServer server;

    @AfterEach
    void close() {
        if (browser != null) browser.quit();
        if (server != null) server.close();
    }

    static byte[] alarm(String code, boolean active) {
        return ("{\"code\":\"" + code + "\",\"severity\":\"warning\",\"active\":" + active + ",\"message\":\"" + code
                + " on line l1\",\"since\":\"2026-12-01T08:00:00Z\"}").getBytes(StandardCharsets.UTF_8);
    }

    /** The text of a value the page's script returns. */
    String js(String script) { return String.valueOf(browser.executeScript(script)); }

    @Test
    void aNoteBeingTyped_keepsItsTextAndFocus_whenAnotherAlarmClearsOrRises() throws Exception {
        Boards boards = Boards.of("l1", Clock.systemUTC());
        boards.heard("l1", Boards.Kind.DASHBOARD, ("{\"line\":\"l1\",\"lot\":\"A1\",\"mode\":\"ready\",\"online\":true,\"parts\":10,"
                + "\"passed\":9,\"yield_pct\":90.0,\"at\":\"2026-12-01T08:00:00Z\"}").getBytes(StandardCharsets.UTF_8));
        boards.heard("l1", Boards.Kind.ALARM, alarm("value-drift", true));
        boards.heard("l1", Boards.Kind.ALARM, alarm("open-residual", true));
        List<String> acted = new CopyOnWriteArrayList<>();
        PageActions actions = (who, action, code, note) -> {
            acted.add(who + ":" + action + ":" + code + ":" + note);
            return action + " done";
        };
        server = StatusServer.start(boards, new StatusServer.Options("127.0.0.1", 0, null, Operators.of(Map.of("ana", TOKEN)), actions, null));
        browser = Chromium.open(dir.resolve("profile"), "1280,800");
        browser.get("http://127.0.0.1:" + server.port() + "/line/l1");
        StatusPageIT.Waiter wait = new StatusPageIT.Waiter(browser, 20_000);
        wait.until(b -> b.findElements(By.cssSelector("#alarms li")).size() == 2);
        browser.findElement(By.id("token")).sendKeys(TOKEN, Keys.ENTER);
        wait.until(b -> b.findElements(By.cssSelector("#alarms li input")).size() == 2);

        By note = By.cssSelector("#alarms li[data-code='value-drift'] input");
        browser.findElement(note).sendKeys("fixture cleaned");
        // another alarm clears while the operator types: the list is drawn again without it
        boards.heard("l1", Boards.Kind.ALARM, alarm("open-residual", false));
        wait.until(b -> b.findElements(By.cssSelector("#alarms li[data-code='open-residual']")).isEmpty());
        assertEquals("fixture cleaned", browser.findElement(note).getAttribute("value"), "the note survived the redraw");
        assertEquals("note for value-drift", js("return document.activeElement && document.activeElement.getAttribute('aria-label');"),
                "the focus stayed in the note");
        // and one rises: the same
        browser.switchTo().activeElement().sendKeys(", contacts checked");
        boards.heard("l1", Boards.Kind.ALARM, alarm("short-residual", true));
        wait.until(b -> !b.findElements(By.cssSelector("#alarms li[data-code='short-residual'] input")).isEmpty());
        assertEquals("fixture cleaned, contacts checked", browser.findElement(note).getAttribute("value"));
        assertEquals("note for value-drift", js("return document.activeElement && document.activeElement.getAttribute('aria-label');"));
        // the operator goes on by keyboard: the note's own acknowledge button follows it
        browser.switchTo().activeElement().sendKeys(Keys.TAB);
        assertEquals("Acknowledge value-drift", browser.switchTo().activeElement().getText());
        browser.switchTo().activeElement().sendKeys(Keys.ENTER);
        wait.until(b -> acted.contains("ana:acknowledge:value-drift:fixture cleaned, contacts checked"));
    }
}
