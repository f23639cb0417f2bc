package net.zbin.io.meter;

import java.nio.file.Path;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;

class TcpMeterLinkTest extends MeterLinkContract {
    SimTcpServer server;

    @Override
    MeterProfile start(SimMeter meter, Path dir) throws Exception {
        server = new SimTcpServer(meter, 0);
        return Profiles.sim(TransportSpec.tcp("127.0.0.1", server.port()));
    }

    @Override
    void stop() { server.close(); }
}
