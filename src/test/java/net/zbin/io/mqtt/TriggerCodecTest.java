package net.zbin.io.mqtt;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import net.zbin.core.Trigger;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.api.Test;

class TriggerCodecTest {
    static byte[] b(String s) { return s.getBytes(StandardCharsets.UTF_8); }

    @Test
    void fullTrigger_isRead() throws Exception {
        Trigger t = TriggerCodec.decode(b("{\"seq\": 7, \"part\": \"P7\", \"lot\": \"L\", \"kind\": \"reference\", \"retest_of\": 3, \"extra\": 1}"));
        assertEquals(new Trigger(7, "P7", "L", Trigger.Kind.REFERENCE, 3), t);
        assertEquals(Trigger.Kind.PART, TriggerCodec.decode(b("{\"seq\":0}")).kind());
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
            "{seq: 1}|not valid JSON",
            "[1,2]|must be a JSON object",
            "{\"part\":\"x\"}|seq is missing",
            "{\"seq\":\"7\"}|seq must be an integer",
            "{\"seq\":-1}|seq must be >= 0",
            "{\"seq\":1.5}|seq must be an integer",
            "{\"seq\":1,\"part\":5}|part must be a string",
            "{\"seq\":1,\"kind\":\"banana\"}|kind must be",
            "{\"seq\":1,\"retest_of\":\"x\"}|retest_of must be an integer",
            "{\"seq\":1,\"retest_of\":1}|retest_of must name an earlier seq",
            "{\"seq\":1,\"lot\":[1]}|lot must be a string"})
    void badTrigger_isRefusedWithAReason(String json, String reason) {
        PayloadException e = assertThrows(PayloadException.class, () -> TriggerCodec.decode(b(json)));
        assertTrue(e.getMessage().contains(reason), e.getMessage());
    }

    @Test
    void payloadOver4KiB_isRefused() {
        String big = "{\"seq\":1,\"part\":\"" + "x".repeat(5000) + "\"}";
        assertTrue(assertThrows(PayloadException.class, () -> TriggerCodec.decode(b(big))).getMessage().contains("limit 4096"));
    }

    @Test
    void controlCharactersInIds_areRefusedNamingTheFieldAndPosition() {
        for (String bad : new String[] {"P\\u0000X", "P\\nX", "P\\u001bX", "P\\u007fX", "P\\u0085X"}) {
            PayloadException e = assertThrows(PayloadException.class, () -> TriggerCodec.decode(b("{\"seq\":1,\"part\":\"" + bad + "\"}")));
            assertTrue(e.getMessage().startsWith("part holds a control character") && e.getMessage().endsWith("position 1"), e.getMessage());
        }
        assertThrows(PayloadException.class, () -> TriggerCodec.decode(b("{\"seq\":1,\"lot\":\"L\\tX\"}")));
    }

    @Test
    void overlongAndBrokenUtf8_isRefused_wellFormedUtf8IsRead() throws Exception {
        // RFC 3629 §3: C0 AF is an overlong encoding of '/', and is invalid UTF-8; a lone continuation byte too
        byte[] overlong = {'{', '"', 's', 'e', 'q', '"', ':', '1', ',', '"', 'p', 'a', 'r', 't', '"', ':', '"', (byte) 0xC0, (byte) 0xAF, '"', '}'};
        assertTrue(assertThrows(PayloadException.class, () -> TriggerCodec.decode(overlong)).getMessage().contains("not well-formed UTF-8"));
        byte[] lone = {'{', '"', 's', 'e', 'q', '"', ':', '1', ',', '"', 'p', 'a', 'r', 't', '"', ':', '"', (byte) 0x80, '"', '}'};
        assertThrows(PayloadException.class, () -> TriggerCodec.decode(lone));
        assertEquals("Kondensator-Ø4,7µ", TriggerCodec.decode(b("{\"seq\":1,\"part\":\"Kondensator-Ø4,7µ\"}")).part());
    }
}
