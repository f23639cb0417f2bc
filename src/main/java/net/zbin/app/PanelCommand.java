package net.zbin.app;

import java.nio.file.Path;
import java.time.Clock;
import java.util.List;
import java.util.concurrent.Callable;
import java.util.concurrent.CountDownLatch;
import net.zbin.app.status.Boards;
import net.zbin.app.status.StatusServer;
import net.zbin.io.LineConfig;
import net.zbin.io.mqtt.MqttLink;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * {@code zbin panel}: one page for a whole floor. Listens to every line's dashboard, state and alarm topics on a
 * broker and shows each line's mode, lot, yield and alarms, each linking to that line's own view (served here from
 * the same messages). Read-only: acting on a line is done on the line's own page or by its command topic.
 */
@Command(name = "panel", mixinStandardHelpOptions = true, sortOptions = false,
        description = {"Serve a plant overview of every line heard on a broker, until SIGTERM or Ctrl-C.",
                "Read-only: each line's own page (status: in its config) is where operators act."})
public final class PanelCommand implements Callable<Integer> {
    @Option(names = "--broker", required = true, paramLabel = "URL", description = "tcp://host:port or ssl://host:port")
    String broker;
    @Option(names = "--topic-root", defaultValue = "zbin", paramLabel = "ROOT", description = "the lines' topic root (default ${DEFAULT-VALUE})")
    String root;
    @Option(names = "--listen", defaultValue = "127.0.0.1:8090", paramLabel = "HOST:PORT",
            description = "where the page is served (default ${DEFAULT-VALUE}; port 0: any free port)")
    String listen;
    @Option(names = "--username", paramLabel = "NAME", description = "broker user (read access to the lines' topics is enough)")
    String username;
    @Option(names = "--password-env", paramLabel = "VAR", description = "environment variable holding the broker password")
    String passwordEnv;
    @Option(names = "--ca-file", paramLabel = "PEM", description = "CA bundle for an ssl:// broker")
    Path caFile;

    @picocli.CommandLine.Spec
    picocli.CommandLine.Model.CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        if (!broker.matches("(tcp|ssl)://[^/:]+:\\d{1,5}")) throw new UsageException("--broker must be tcp://host:port or ssl://host:port (was '" + broker + "')");
        if (broker.startsWith("ssl://") && caFile == null) throw new UsageException("--ca-file is required for an ssl:// broker");
        if (root.isEmpty() || root.contains("+") || root.contains("#") || root.startsWith("/") || root.endsWith("/"))
            throw new UsageException("--topic-root must be a plain topic prefix without wildcards or outer slashes (was '" + root + "')");
        net.zbin.io.HostPort at;
        try {
            at = net.zbin.io.HostPort.parse(listen);
        } catch (IllegalArgumentException e) {
            throw new UsageException("--listen " + e.getMessage());
        }
        char[] password = null;
        if (passwordEnv != null) {
            String v = System.getenv(passwordEnv);
            if (v == null) throw new UsageException("--password-env: environment variable " + passwordEnv + " is not set");
            password = v.toCharArray();
        }
        Boards boards = Boards.plant(Clock.systemUTC());
        var settings = new LineConfig.MqttSettings(broker, root, "zbin-panel-" + ProcessHandle.current().pid(), username, password, caFile,
                null, null, 10);
        int depth = root.split("/").length;
        MqttLink mqtt = new MqttLink(settings, null, null, List.of(root + "/+/dashboard", root + "/+/state", root + "/+/alarm"),
                (topic, payload) -> {
                    String[] t = topic.split("/");
                    if (t.length != depth + 2) return;
                    Boards.Kind k = switch (t[depth + 1]) {
                        case "dashboard" -> Boards.Kind.DASHBOARD;
                        case "state" -> Boards.Kind.STATE;
                        case "alarm" -> Boards.Kind.ALARM;
                        default -> null;
                    };
                    if (k != null) boards.heard(t[depth], k, payload);
                });
        StatusServer server;
        try {
            server = StatusServer.start(boards, new StatusServer.Options(at.host(), at.port(), null, null, null, null));
        } catch (java.net.BindException e) {
            spec.commandLine().getErr().println("zbin: --listen: cannot listen on " + listen + ": " + e.getMessage());
            mqtt.close();
            return Main.EXIT_RUNTIME;
        }
        CountDownLatch stopped = new CountDownLatch(1);
        Runtime.getRuntime().addShutdownHook(new Thread(() -> {
            server.close();
            mqtt.close();
            stopped.countDown();
        }, "zbin-panel-stop"));
        try {
            mqtt.connect(30_000);
        } catch (org.eclipse.paho.client.mqttv3.MqttException e) {
            spec.commandLine().getErr().println("zbin: cannot connect to " + broker + ": " + RunCommand.why(e));
            return Main.EXIT_RUNTIME;
        }
        spec.commandLine().getOut().println("zbin: plant panel " + server.url() + " for every line under " + root + "/ on " + broker);
        spec.commandLine().getOut().flush();
        stopped.await();
        return Main.EXIT_OK;
    }
}
