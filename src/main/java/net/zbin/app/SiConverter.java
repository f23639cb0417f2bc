package net.zbin.app;

import net.zbin.core.SiValue;
import picocli.CommandLine;

/** Lets numeric options take SI prefixes: {@code --freq 1k}, {@code --open-c 2p}. */
public final class SiConverter implements CommandLine.ITypeConverter<Double> {
    @Override
    public Double convert(String value) {
        try {
            return SiValue.parse(value);
        } catch (IllegalArgumentException e) {
            throw new CommandLine.TypeConversionException(e.getMessage());
        }
    }
}
