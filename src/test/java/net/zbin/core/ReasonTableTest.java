package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.Set;
import java.util.TreeSet;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Collectors;
import org.junit.jupiter.api.Test;

/** The README's reason-code and alarm tables list exactly the codes the code knows: adding one is one constant and one row. */
class ReasonTableTest {
    @Test
    void readmeReasonTable_matchesTheReasonEnum() throws Exception {
        String readme = Files.readString(Path.of("README.md"));
        int from = readme.indexOf("## Reason codes");
        int to = readme.indexOf("\n## ", from + 1);
        Set<String> documented = new TreeSet<>();
        for (String line : readme.substring(from, to).split("\n")) {
            if (!line.startsWith("| `")) continue;
            Matcher m = Pattern.compile("`([a-z-]+)`").matcher(line.substring(0, line.indexOf('|', 2)));
            while (m.find()) documented.add(m.group(1));
        }
        Set<String> known = Arrays.stream(Reason.values()).map(Reason::code).collect(Collectors.toCollection(TreeSet::new));
        assertEquals(known, documented);
    }

    @Test
    void readmeAlarmTable_matchesTheAlarmCodes() throws Exception {
        String readme = Files.readString(Path.of("README.md"));
        int from = readme.indexOf("| code | severity | raised when | clears when |");
        Set<String> documented = new TreeSet<>();
        for (String line : readme.substring(from).split("\n")) {
            if (line.isBlank()) break;
            Matcher m = Pattern.compile("^\\| `([a-z-]+)` \\| (warning|critical) \\|").matcher(line);
            if (m.find()) {
                documented.add(m.group(1));
                assertEquals(AlarmCode.parse(m.group(1)).severity().key(), m.group(2), line);
            }
        }
        Set<String> known = Arrays.stream(AlarmCode.values()).map(AlarmCode::code).collect(Collectors.toCollection(TreeSet::new));
        assertEquals(known, documented);
    }

    @Test
    void everyReasonCode_parsesBackToItself() {
        for (Reason r : Reason.values()) assertEquals(r, Reason.parse(r.code()));
    }
}
