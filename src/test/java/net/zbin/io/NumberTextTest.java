package net.zbin.io;

import static org.junit.jupiter.api.Assertions.assertEquals;

import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;
import net.zbin.io.mqtt.Payloads;
import org.junit.jupiter.api.Test;

/**
 * The record log and the payloads write a double as text once and are read back by replay, the historian and the
 * handler: what is read must be the very double that was graded, bit for bit, whatever the writer's shortcut.
 */
class NumberTextTest {
    /** Any finite double, by its bits (every exponent and mantissa), and the values a line writes every part. */
    @Provide
    Arbitrary<Double> finite() {
        Arbitrary<Double> anyBits = Arbitraries.longs().map(Double::longBitsToDouble).filter(Double::isFinite);
        Arbitrary<Double> lineValues = Arbitraries.doubles().between(-1e7, 1e7).ofScale(12);
        return Arbitraries.oneOf(anyBits, lineValues, Arbitraries.of(0.0, -0.0, Double.MIN_VALUE, Double.MAX_VALUE, 1e23, 2e-3, 9.999999999999999e22));
    }

    @Property(tries = 5_000, seed = "4471")
    void aRowsNumber_readsBackAsTheSameDouble(@ForAll("finite") double v) {
        String text = Json.text(v);
        assertEquals(Double.doubleToLongBits(v), Double.doubleToLongBits(Double.parseDouble(text)), text);
        // the parser the record log's readers (read-back, replay) use
        assertEquals(Double.doubleToLongBits(v), Double.doubleToLongBits(ch.randelshofer.fastdoubleparser.JavaDoubleParser.parseDouble(text)), text);
    }

    @Property(tries = 5_000, seed = "4472")
    void aPayloadsNumber_readsBackAsTheSameDouble(@ForAll("finite") double v) throws Exception {
        byte[] b = Payloads.bytes(Json.num(Json.object(), "value", v));
        double back = Json.mapper().readTree(b).get("value").doubleValue();
        assertEquals(Double.doubleToLongBits(v), Double.doubleToLongBits(back), new String(b, java.nio.charset.StandardCharsets.UTF_8));
    }

    @Test
    void theUsualValues_readAsJavaWritesThem() {
        // Double.toString's form (Java SE API, Double.toString): plain between 10^-3 and 10^7, computerized scientific outside
        assertEquals("1.0E-7", Json.text(100e-9));
        assertEquals("1591.5494309189535", Json.text(1591.5494309189535));
        assertEquals("0.001", Json.text(0.001));
        assertEquals("1.0E7", Json.text(1e7));
        assertEquals("-0.0", Json.text(-0.0));
    }
}
