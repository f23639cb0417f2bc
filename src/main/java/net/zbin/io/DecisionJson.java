package net.zbin.io;

import com.fasterxml.jackson.databind.node.ObjectNode;
import net.zbin.core.Decision;

/** The decision payload of the MQTT contract; also the {@code decision} of {@code zbin calc}. Fields: {@link DecisionFields}. */
public final class DecisionJson {
    private DecisionJson() {}

    public static ObjectNode encode(Decision d) { return DecisionFields.json(d); }
}
