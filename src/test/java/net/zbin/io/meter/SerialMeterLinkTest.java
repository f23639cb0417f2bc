package net.zbin.io.meter;

import java.nio.file.Path;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimSerialEndpoint;

/** The same contract over a real socat pty pair, jSerialComm on both ends. */
class SerialMeterLinkTest extends MeterLinkContract {
    PtyPair pty;
    SimSerialEndpoint endpoint;

    @Override
    MeterProfile start(SimMeter meter, Path dir) throws Exception {
        pty = new PtyPair(dir);
        endpoint = new SimSerialEndpoint(meter, pty.b.toString(), 115200);
        return Profiles.sim(TransportSpec.serial(Profiles.serial(pty.a)));
    }

    @Override
    void stop() throws Exception {
        endpoint.close();
        pty.close();
    }
}
