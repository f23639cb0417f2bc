package net.zbin.sim;

import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.databind.DeserializationContext;
import com.fasterxml.jackson.databind.JsonDeserializer;
import java.io.IOException;
import net.zbin.core.SiValue;
import net.zbin.core.Unit;

/** Lets scenario numbers be written with SI prefixes ("100n", "2.2p"). */
final class SiNumber extends JsonDeserializer<Double> {
    @Override
    public Double deserialize(JsonParser p, DeserializationContext ctx) throws IOException {
        if (p.currentToken().isNumeric()) return p.getDoubleValue();
        String text = p.getValueAsString();
        try {
            return SiValue.parse(text, Unit.ANY);
        } catch (IllegalArgumentException e) {
            try {
                // R and K as decimal marker or unit (33R, 4K7) belong to resistance only: such a value is ohms
                return SiValue.parse(text, Unit.OHM);
            } catch (IllegalArgumentException notOhms) {
                return (Double) ctx.handleWeirdStringValue(Double.class, text, e.getMessage());
            }
        }
    }
}
