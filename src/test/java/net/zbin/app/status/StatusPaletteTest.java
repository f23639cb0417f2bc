package net.zbin.app.status;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;

/**
 * The status pages' text contrast meets WCAG 2.1 level AA: 4.5:1 for text (success criterion 1.4.3), computed with
 * WCAG 2.1's definitions of relative luminance and contrast ratio from the colours the stylesheet actually declares.
 */
class StatusPaletteTest {
    /** WCAG 2.1, definition "relative luminance": sRGB channels linearized, weighted 0.2126, 0.7152, 0.0722. */
    static double luminance(int rgb) {
        double[] c = new double[3];
        for (int i = 0; i < 3; i++) {
            double v = ((rgb >> (16 - 8 * i)) & 0xff) / 255.0;
            c[i] = v <= 0.03928 ? v / 12.92 : Math.pow((v + 0.055) / 1.055, 2.4);
        }
        return 0.2126 * c[0] + 0.7152 * c[1] + 0.0722 * c[2];
    }

    /** WCAG 2.1, definition "contrast ratio": (L1 + 0.05) / (L2 + 0.05), L1 the lighter. */
    static double contrast(int a, int b) {
        double la = luminance(a), lb = luminance(b);
        return (Math.max(la, lb) + 0.05) / (Math.min(la, lb) + 0.05);
    }

    @Test
    void contrastFormula_matchesWcagsOwnFigures() {
        assertEquals(21.0, contrast(0x000000, 0xffffff), 1e-9); // WCAG 2.1 definition of contrast ratio: range 1 to 21
        assertEquals(1.0, contrast(0x777777, 0x777777), 1e-9);
        // common practice (from memory): #767676 is the lightest grey that passes 4.5:1 on white, #777777 just fails
        assertTrue(contrast(0x767676, 0xffffff) >= 4.5);
        assertTrue(contrast(0x777777, 0xffffff) < 4.5);
    }

    /** Every foreground/background pair the stylesheet uses for text. */
    static final List<String[]> TEXT_PAIRS = List.of(
            new String[] {"ink", "paper"}, new String[] {"ink", "card"}, new String[] {"muted", "paper"}, new String[] {"muted", "card"},
            new String[] {"band-ink", "band"}, new String[] {"badge-ink", "ready"}, new String[] {"badge-ink", "paused"},
            new String[] {"badge-ink", "fault"}, new String[] {"badge-ink", "offline"}, new String[] {"badge-ink", "accent"},
            new String[] {"accent", "card"}, new String[] {"accent", "paper"}, new String[] {"limit", "card"}, new String[] {"ack", "paper"},
            new String[] {"warn-ink", "warn-bg"});

    @Test
    void everyTextColourPair_meetsWcag21AA() throws Exception {
        String css;
        try (InputStream in = StatusPaletteTest.class.getResourceAsStream("/zbin-status/zbin.css")) {
            css = new String(in.readAllBytes(), StandardCharsets.UTF_8);
        }
        Map<String, Integer> colours = new HashMap<>();
        Matcher m = Pattern.compile("--([a-z-]+):\\s*#([0-9a-fA-F]{6})\\s*;").matcher(css);
        while (m.find()) colours.put(m.group(1), Integer.parseInt(m.group(2), 16));
        StringBuilder report = new StringBuilder();
        for (String[] p : TEXT_PAIRS) {
            Integer fg = colours.get(p[0]), bg = colours.get(p[1]);
            assertTrue(fg != null && bg != null, "the stylesheet declares --" + p[0] + " and --" + p[1]);
            double c = contrast(fg, bg);
            report.append(String.format(java.util.Locale.ROOT, "%s on %s %.2f:1%n", p[0], p[1], c));
            assertTrue(c >= 4.5, p[0] + " on " + p[1] + " is " + c + ":1, below WCAG 2.1 AA's 4.5:1");
        }
        System.out.print(report);
    }
}
