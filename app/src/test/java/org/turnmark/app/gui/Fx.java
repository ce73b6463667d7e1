package org.turnmark.app.gui;

import java.util.concurrent.Callable;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import java.util.function.BooleanSupplier;

import javafx.application.Platform;

import org.testfx.api.FxToolkit;

/**
 * Runs test code on the JavaFX application thread without showing a window (the toolkit starts
 * headless through Monocle, see the surefire argLine).
 */
final class Fx {

    /** Hang guard for background work in tests (not a timing assertion). */
    static final long MAX_WAIT_SECONDS = 60;

    private static boolean started;

    private Fx() {
    }

    static synchronized void start() {
        if (started) {
            return;
        }
        // JavaFX warns once that it was loaded from the classpath; tests stay silent.
        java.util.logging.Logger.getLogger("javafx").setLevel(java.util.logging.Level.SEVERE);
        try {
            // Started the way TestFX starts it, so that window tests running later in the same JVM
            // find the toolkit in the state they expect.
            FxToolkit.registerPrimaryStage();
        } catch (TimeoutException e) {
            throw new AssertionError("JavaFX toolkit did not start", e);
        }
        started = true;
    }

    static <T> T call(Callable<T> c) {
        CompletableFuture<T> f = new CompletableFuture<>();
        Platform.runLater(() -> {
            try {
                f.complete(c.call());
            } catch (Throwable t) {
                f.completeExceptionally(t);
            }
        });
        try {
            return f.get(MAX_WAIT_SECONDS, TimeUnit.SECONDS);
        } catch (Exception e) {
            throw new AssertionError("FX call failed", e);
        }
    }

    static void run(Runnable r) {
        call(() -> {
            r.run();
            return null;
        });
    }

    /** Waits until {@code condition} (evaluated on the FX thread) holds; fails after the hang guard. */
    static void waitFor(String what, BooleanSupplier condition) {
        long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(MAX_WAIT_SECONDS);
        while (!call(condition::getAsBoolean)) {
            if (System.nanoTime() > end) {
                throw new AssertionError("gave up waiting for: " + what);
            }
            try {
                Thread.sleep(20);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                throw new AssertionError("interrupted waiting for: " + what, e);
            }
        }
    }
}
