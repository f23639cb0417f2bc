package net.zbin.core;

/**
 * A later step of a recipe's test plan: the part is read again at other conditions and judged by gates only (ESR at
 * 100 kHz after C and D at 120 Hz; Q at 1 MHz after L at 100 kHz). The value step grades; a later step can only
 * reject — into the recipe's gate bin, with the gate's reason — and a reading of it that is not clean goes through the
 * retest policy like any other.
 *
 * @param name  the step's id, as the record log names it
 * @param test  the meter's conditions for it
 * @param gates what it must meet (at least one gate)
 */
public record TestStep(String name, TestConditions test, Gates gates) {
    public TestStep {
        if (name == null || !name.matches("[a-z][a-z0-9_-]{0,31}") || name.equals("value"))
            throw new SpecException("steps[].name", "must be 1..32 lower-case letters, digits, '_' or '-', not 'value' (was '" + name + "')");
        if (test == null) throw new SpecException("steps[" + name + "].test", "is required");
        if (gates == null || gates.equals(Gates.NONE))
            throw new SpecException("steps[" + name + "].gates", "give at least one gate: a later step can only reject by its gates");
    }
}
