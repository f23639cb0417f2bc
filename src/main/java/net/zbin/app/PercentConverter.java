package net.zbin.app;

import picocli.CommandLine.ITypeConverter;
import picocli.CommandLine.TypeConversionException;

/**
 * A number of percent for an option whose unit is already %: "0.05" and "0.05%" mean the same, 0.05 %.
 * The number itself is never rescaled.
 */
public final class PercentConverter implements ITypeConverter<Double> {
    @Override
    public Double convert(String value) {
        String t = value.trim();
        if (t.endsWith("%")) t = t.substring(0, t.length() - 1).trim();
        try {
            return Double.valueOf(t);
        } catch (NumberFormatException e) {
            throw new TypeConversionException("'" + value + "' is not a number of percent (write e.g. 0.05 or 0.05%)");
        }
    }
}
