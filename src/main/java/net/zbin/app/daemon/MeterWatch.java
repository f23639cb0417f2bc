package net.zbin.app.daemon;

import java.util.concurrent.atomic.AtomicBoolean;
import java.util.function.Supplier;
import net.zbin.core.Recipe;
import net.zbin.io.meter.MeterException;
import net.zbin.io.meter.MeterSession;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Brings the meter link back without waiting for a trigger: while the line is in fault (link down, or the
 * test conditions refused) it asks for a
 * probe (test conditions, then identification) on the measuring thread, between parts; the session
 * keeps its own reconnect backoff, so a probe inside the backoff costs nothing. Success clears the
 * alarm and returns the line to ready.
 */
final class MeterWatch {
    private static final Logger LOG = LoggerFactory.getLogger(MeterWatch.class);

    private final MeterSession meter;
    private final LineMode mode;
    private final Supplier<Recipe> recipe;
    private final AtomicBoolean pending = new AtomicBoolean();

    MeterWatch(MeterSession meter, LineMode mode, Supplier<Recipe> recipe) {
        this.meter = meter;
        this.mode = mode;
        this.recipe = recipe;
    }

    /** Ticker thread: queues one probe while the link is down. */
    void tick(Dispatch dispatch) {
        if (!(mode.linkDown() || mode.setupRefused()) || !pending.compareAndSet(false, true)) return;
        if (!dispatch.onMeasuringThread(() -> {
            probe();
            pending.set(false);
        })) pending.set(false);
    }

    /** Measuring thread (or before serving): is the meter there? */
    void probe() {
        try {
            meter.apply(recipe.get().test());
            LOG.info("meter: {}", meter.identify());
            mode.setLinkDown(false, null);
            mode.setSetupRefused(false, null);
        } catch (MeterException e) {
            LOG.debug("meter not ready: {}", e.getMessage());
            if (e.kind() == net.zbin.core.FaultKind.SETUP_REFUSED) {
                mode.setLinkDown(false, null);
                mode.setSetupRefused(true, e.getMessage());
            } else mode.setLinkDown(true, e.getMessage());
        }
    }
}
