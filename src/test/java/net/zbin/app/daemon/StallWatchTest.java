package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.List;
import java.util.concurrent.atomic.AtomicLong;
import org.junit.jupiter.api.Test;

class StallWatchTest {
    private static final long MS = 1_000_000;
    private final AtomicLong clock = new AtomicLong(5_000 * MS);
    private final StallWatch w = new StallWatch(clock::get);
    /** No message taken up before. */
    private static final long NONE = Long.MIN_VALUE / 4;

    /** A stand-still the watch saw: the last beat before it and the first after it. */
    private record Stood(long began, long ended) {}

    /** 10 ms of a running process, then a stand-still of {@code ms} that the watch's next beat ends. */
    private Stood standStill(long ms) {
        run(10);
        long began = clock.get();
        clock.addAndGet(ms * MS);
        w.beat();
        return new Stood(began, clock.get());
    }

    /** Beats every 2 ms for {@code ms}, as the watch's thread does on a process that runs. */
    private void run(long ms) {
        for (long t = 0; t < ms; t += 2) {
            clock.addAndGet(2 * MS);
            w.beat();
        }
    }

    @Test
    void aWatchThatNeverBeat_seesNoStandStill() {
        StallWatch idle = new StallWatch(clock::get);
        clock.addAndGet(1_000 * MS);
        assertEquals(clock.get(), idle.mayHaveComeAt(clock.get(), NONE));
    }

    @Test
    void theTimeBeforeTheWatchStarts_isNoStandStill() {
        StallWatch late = new StallWatch(clock::get);
        clock.addAndGet(100 * MS); // the line built, then started a while later
        late.start("test");
        try {
            assertEquals(clock.get(), late.mayHaveComeAt(clock.get(), NONE));
        } finally {
            late.stop();
        }
    }

    @Test
    void aProcessThatRuns_stampsAMessageWhenItIsTakenUp() {
        run(100);
        long now = clock.get() + MS;
        assertEquals(now, w.mayHaveComeAt(now, NONE));
    }

    @Test
    void aLateWakeUpShorterThanAStandStill_isNotOne() {
        run(10);
        clock.addAndGet(StallWatch.STALL_NANOS); // a wake-up late by five beats: not more than the bound
        w.beat();
        long now = clock.get() + MS;
        assertEquals(now, w.mayHaveComeAt(now, NONE));
    }

    @Test
    void aStandStillTheWatchSawEnd_datesTheMessagesRightAfterItToItsStart_thenNoMore() {
        Stood st = standStill(400); // stopped for 0.4 s
        long began = st.began(), ended = st.ended();
        assertEquals(began, w.mayHaveComeAt(ended - MS, NONE), "taken up just before the watch beat again: covered");
        assertEquals(began, w.mayHaveComeAt(ended + MS, ended - MS), "read right after it: may have waited on the connection since it began");
        run(2);
        long now = clock.get();
        assertEquals(now, w.mayHaveComeAt(now, ended + MS), "a beat after it, a message is new: its wait counts from now");
    }

    @Test
    void aLongStandStill_datesOnlyWhatIsTakenUpWithinABeatOfItsEnd() {
        Stood st = standStill(2_000);
        long began = st.began(), ended = st.ended();
        assertEquals(began, w.mayHaveComeAt(ended + StallWatch.AFTER_NANOS - 1, NONE));
        assertEquals(ended + StallWatch.AFTER_NANOS, w.mayHaveComeAt(ended + StallWatch.AFTER_NANOS, ended + StallWatch.AFTER_NANOS - 1),
                "two seconds still, a beat after: new (a handler presenting again at once is not dated back again and again)");
    }

    @Test
    void anOverdueWatch_datesTheMessageToItsLastBeat() {
        run(10);
        long lastBeat = clock.get();
        clock.addAndGet(300 * MS); // the taking thread moves again before the watch's
        assertEquals(lastBeat, w.mayHaveComeAt(clock.get(), NONE), "a stand-still may be ending now: counted from the last beat");
        clock.addAndGet(-295 * MS);
        assertEquals(clock.get(), w.mayHaveComeAt(clock.get(), NONE), "5 ms after the last beat: not overdue");
    }

    @Test
    void theFirstMessageTakenUpAfterAStandStill_isDatedToItsStart_evenWhenItsThreadMovesLate_theNextIsNot() {
        Stood st = standStill(400);
        long began = st.began(), ended = st.ended();
        run(30); // the thread that takes messages up moves again 30 ms after the watch (a loaded machine)
        long first = clock.get();
        assertEquals(began, w.mayHaveComeAt(first, ended - 500 * MS), "the first since: it may have waited through it");
        assertEquals(first + MS, w.mayHaveComeAt(first + MS, first), "the next one, a millisecond later: new");
        run(StallWatch.FIRST_NANOS / MS);
        assertEquals(clock.get(), w.mayHaveComeAt(clock.get(), ended - 500 * MS), "long after it, even the first since is new");
    }

    @Test
    void afterAShortStandStill_theFirstMessageIsDatedBackOnlyWithinItsLength() {
        Stood st = standStill(12); // a late wake-up of the watch on a loaded machine, or a short collection
        long began = st.began(), ended = st.ended();
        run(8);
        assertEquals(began, w.mayHaveComeAt(clock.get(), ended - 100 * MS), "8 ms after a 12 ms stand-still: dated to it");
        run(8);
        assertEquals(clock.get(), w.mayHaveComeAt(clock.get(), ended - 100 * MS),
                "16 ms after it: new — a fresh part's wait does not grow by more than twice a short stand-still");
    }

    @Test
    void standStills_areLoggedUpToTenAMinute_theOnesHeldBackCountedInALaterWarning() {
        var log = (ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(StallWatch.class);
        var heard = new ch.qos.logback.core.read.ListAppender<ch.qos.logback.classic.spi.ILoggingEvent>();
        heard.start();
        log.addAppender(heard);
        try {
            standStill(30); // shorter than LOGGED_NANOS: not worth a line
            for (int i = 0; i < StallWatch.LOGGED_PER_MINUTE; i++) standStill(100);
            assertEquals(StallWatch.LOGGED_PER_MINUTE, heard.list.size());
            assertEquals("the process stood still for 100 ms", messages(heard).get(0));
            standStill(80); // an overloaded machine: three more within the minute, held back
            standStill(300);
            standStill(60);
            assertEquals(StallWatch.LOGGED_PER_MINUTE, heard.list.size());
            run(60_000);
            assertEquals("stand-stills not logged in the last 60 s: 3, the longest 300 ms", messages(heard).get(StallWatch.LOGGED_PER_MINUTE));
            int said = heard.list.size();
            assertEquals(StallWatch.LOGGED_PER_MINUTE + 1, said, "nothing more while the process runs");
            for (int i = 0; i < StallWatch.LOGGED_PER_MINUTE; i++) standStill(70); // the summary was one of this minute's ten
            assertEquals(said + StallWatch.LOGGED_PER_MINUTE - 1, heard.list.size());
            standStill(61_000); // the minute (begun by the summary, 63 s before this beat) ends within it: the one held back, then it
            List<String> last2 = messages(heard).subList(heard.list.size() - 2, heard.list.size());
            assertEquals(List.of("stand-stills not logged in the last 63 s: 1, the longest 70 ms", "the process stood still for 61000 ms"), last2);
            said = heard.list.size();
            run(120_000);
            assertEquals(said, heard.list.size(), "nothing held back: no summary");
        } finally {
            log.detachAppender(heard);
        }
    }

    private static java.util.List<String> messages(ch.qos.logback.core.read.ListAppender<ch.qos.logback.classic.spi.ILoggingEvent> a) {
        return a.list.stream().map(ch.qos.logback.classic.spi.ILoggingEvent::getFormattedMessage).toList();
    }
}
