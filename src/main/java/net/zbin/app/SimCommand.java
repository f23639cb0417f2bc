package net.zbin.app;

import picocli.CommandLine.Command;

/** {@code zbin sim}: the simulators on their own. */
@Command(name = "sim", mixinStandardHelpOptions = true,
        description = "Run a simulator on its own: the meter (TCP or serial), the handler, or write a simulated lot as CSV.",
        subcommands = {SimMeterCommand.class, SimHandlerCommand.class, SimLotCommand.class})
public final class SimCommand implements Runnable {
    @picocli.CommandLine.Spec
    picocli.CommandLine.Model.CommandSpec spec;

    @Override
    public void run() {
        throw new picocli.CommandLine.ParameterException(spec.commandLine(), "name a simulator: meter, handler or lot");
    }
}
