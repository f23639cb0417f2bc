package net.zbin.app;

import net.zbin.core.SiValue;
import net.zbin.core.Unit;
import picocli.CommandLine;

/**
 * Lets numeric options take SI prefixes in their own unit: {@code --freq 1k}, {@code --open-c 2p}; a
 * unit written with the number must be the option's ({@code --r 1kHz} is refused).
 */
public abstract class SiConverter implements CommandLine.ITypeConverter<Double> {
    private final Unit unit;

    SiConverter(Unit unit) { this.unit = unit; }

    @Override
    public Double convert(String value) {
        try {
            return SiValue.parse(value, unit);
        } catch (IllegalArgumentException e) {
            throw new CommandLine.TypeConversionException(e.getMessage());
        }
    }

    public static final class Hertz extends SiConverter { public Hertz() { super(Unit.HERTZ); } }
    public static final class Ohm extends SiConverter { public Ohm() { super(Unit.OHM); } }
    public static final class Farad extends SiConverter { public Farad() { super(Unit.FARAD); } }
    public static final class Siemens extends SiConverter { public Siemens() { super(Unit.SIEMENS); } }
    public static final class Degree extends SiConverter { public Degree() { super(Unit.DEGREE); } }
}
