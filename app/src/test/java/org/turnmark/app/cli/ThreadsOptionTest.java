package org.turnmark.app.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class ThreadsOptionTest {

    @Test
    void zeroOrNegativeThreadsAreRejectedWithTheValue() {
        String msg = ThreadsOption.applyFromArgs(new String[] {"register", "--threads", "0"});
        assertTrue(msg != null && msg.contains("got 0"), "message was " + msg);
        msg = ThreadsOption.applyFromArgs(new String[] {"simulate", "--threads=-2"});
        assertTrue(msg != null && msg.contains("got -2"), "message was " + msg);
    }

    @Test
    void validThreadsSetThePoolProperty() {
        String before = System.getProperty(org.turnmark.geom.Parallel.THREADS_PROPERTY);
        try {
            assertNull(ThreadsOption.applyFromArgs(new String[] {"plan", "case.json", "--threads", "2"}));
            assertEquals("2", System.getProperty(org.turnmark.geom.Parallel.THREADS_PROPERTY));
            assertNull(ThreadsOption.applyFromArgs(new String[] {"inspect", "a.nii"}));
        } finally {
            if (before == null) {
                System.clearProperty(org.turnmark.geom.Parallel.THREADS_PROPERTY);
            } else {
                System.setProperty(org.turnmark.geom.Parallel.THREADS_PROPERTY, before);
            }
        }
    }
}
