package org.turnmark.app.gui;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.logging.Level;
import java.util.logging.Logger;

import javafx.beans.binding.Bindings;
import javafx.beans.binding.BooleanBinding;
import javafx.beans.property.BooleanProperty;
import javafx.beans.property.DoubleProperty;
import javafx.beans.property.IntegerProperty;
import javafx.beans.property.ObjectProperty;
import javafx.beans.property.ReadOnlyBooleanProperty;
import javafx.beans.property.ReadOnlyBooleanWrapper;
import javafx.beans.property.ReadOnlyObjectProperty;
import javafx.beans.property.ReadOnlyObjectWrapper;
import javafx.beans.property.SimpleBooleanProperty;
import javafx.beans.property.SimpleDoubleProperty;
import javafx.beans.property.SimpleIntegerProperty;
import javafx.beans.property.SimpleObjectProperty;
import javafx.beans.property.SimpleStringProperty;
import javafx.beans.property.StringProperty;
import javafx.collections.FXCollections;
import javafx.collections.ObservableList;
import javafx.concurrent.Task;

import org.turnmark.app.pipeline.CaseFile;
import org.turnmark.app.pipeline.CaseFile.LesionMark;
import org.turnmark.app.pipeline.CaseFileReader;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;
import org.turnmark.geom.ResearchUse;
import org.turnmark.registration.nifti.NiftiReader;
import org.turnmark.registration.volume.Volume;

/**
 * State and actions of the main window: open a case or a plan folder, choose the image shown, place
 * and edit lesion marks (world RAS mm), run the plan in the background with progress and
 * cancellation, and show the results. Properties only (no scene graph). Methods must be called on the
 * JavaFX application thread; long work (reading images, planning) runs on a worker thread and comes
 * back through {@link Task} callbacks. Errors appear as one short line in {@link #errorProperty()}
 * and their stack trace is logged once.
 */
public final class MainViewModel {

    private static final Logger LOG = Logger.getLogger(MainViewModel.class.getName());

    /** What the window shows. */
    public enum Mode {
        /** Nothing open. */
        EMPTY,
        /** A case file: inputs, editable marks, run. */
        CASE,
        /** A plan output folder: results for review. */
        PLAN
    }

    private final PlanLauncher launcher;
    private final ExecutorService worker = Executors.newCachedThreadPool(r -> {
        Thread t = new Thread(r, "turnmark-gui-worker");
        t.setDaemon(true);
        return t;
    });

    private final ViewerViewModel viewer = new ViewerViewModel();
    private final ObjectProperty<Mode> mode = new SimpleObjectProperty<>(this, "mode", Mode.EMPTY);
    private final StringProperty title = new SimpleStringProperty(this, "title", "Turnmark");
    private final ObservableList<InfoRow> inputs = FXCollections.observableArrayList();
    private final ObservableList<ImageChoice> images = FXCollections.observableArrayList();
    private final ObjectProperty<ImageChoice> selectedImage = new SimpleObjectProperty<>(this, "selectedImage");
    private final ObservableList<String> lesionIds = FXCollections.observableArrayList();
    private final IntegerProperty selectedLesion = new SimpleIntegerProperty(this, "selectedLesion", -1);
    private final DoubleProperty markX = new SimpleDoubleProperty(this, "markX");
    private final DoubleProperty markY = new SimpleDoubleProperty(this, "markY");
    private final DoubleProperty markZ = new SimpleDoubleProperty(this, "markZ");
    private final BooleanProperty placeMarkOnClick = new SimpleBooleanProperty(this, "placeMarkOnClick", true);
    private final StringProperty outputFolder = new SimpleStringProperty(this, "outputFolder", "");
    private final BooleanProperty overwrite = new SimpleBooleanProperty(this, "overwrite", false);
    private final ReadOnlyBooleanWrapper running = new ReadOnlyBooleanWrapper(this, "running", false);
    private final DoubleProperty progress = new SimpleDoubleProperty(this, "progress", 0);
    private final StringProperty stage = new SimpleStringProperty(this, "stage", "");
    private final ObservableList<ResultRow> results = FXCollections.observableArrayList();
    private final ObservableList<String> flags = FXCollections.observableArrayList();
    private final StringProperty planFolderText = new SimpleStringProperty(this, "planFolderText", "");
    private final StringProperty status = new SimpleStringProperty(this, "status", "Open a case file or a plan folder.");
    private final StringProperty error = new SimpleStringProperty(this, "error", "");
    private final ReadOnlyObjectWrapper<CaseFile> currentCase = new ReadOnlyObjectWrapper<>(this, "currentCase");
    private final BooleanBinding runDisabled;

    /** Positions (RAS mm) of the case's lesion marks as edited, by lesion id, in case order. */
    private final Map<String, double[]> marks = new LinkedHashMap<>();
    private Path casePath;
    private Grid3 proneGrid;
    private boolean loadingMark;
    private ProgressTask<Path> runTask;
    private Task<?> loadTask;
    /** Set when a plan is opened: the first image shown centres the crosshair on a prediction. */
    private boolean centreOnPrediction;

    /**
     * @param launcher runs a plan; null when this build cannot plan (the run action is then disabled)
     */
    public MainViewModel(PlanLauncher launcher) {
        this.launcher = launcher;
        runDisabled = Bindings.createBooleanBinding(
                () -> this.launcher == null || mode.get() != Mode.CASE || running.get() || proneGrid == null
                        || marks.isEmpty(),
                mode, running, viewer.volumeProperty());
        selectedImage.addListener((o, a, b) -> {
            if (b != null && b != a) {
                loadImage(b);
            }
        });
        selectedLesion.addListener((o, a, b) -> loadMarkFields());
        markX.addListener((o, a, b) -> storeMarkFields());
        markY.addListener((o, a, b) -> storeMarkFields());
        markZ.addListener((o, a, b) -> storeMarkFields());
    }

    /** The caution shown at all times. */
    public String caution() {
        return ResearchUse.FULL;
    }

    /** Opens a case file ({@code .json}) or a plan output folder (holding {@code plan.json}). */
    public void open(Path path) {
        Path p = path.toAbsolutePath().normalize();
        if (Files.isDirectory(p)) {
            openPlanFolder(p);
        } else {
            openCase(p);
        }
    }

    /** Reads and validates a case file, then shows its inputs and loads the prone image. */
    public void openCase(Path file) {
        error.set("");
        status.set("Reading case " + file.getFileName() + " …");
        Task<CaseFile> t = new Task<>() {
            @Override
            protected CaseFile call() {
                return new CaseFileReader().read(file);
            }
        };
        t.setOnSucceeded(e -> showCase(file, t.getValue()));
        t.setOnFailed(e -> fail("Cannot open the case", t.getException()));
        worker.submit(t);
    }

    private void showCase(Path file, CaseFile c) {
        casePath = file;
        proneGrid = null;
        currentCase.set(c);
        results.clear();
        flags.clear();
        planFolderText.set("");
        viewer.clear();
        inputs.setAll(CaseSummary.rows(c));
        marks.clear();
        List<String> ids = new ArrayList<>();
        for (LesionMark m : c.lesions()) {
            ids.add(m.id());
            if (m.positionRasMm() != null) {
                marks.put(m.id(), m.positionRasMm().clone());
            }
        }
        lesionIds.setAll(ids);
        Path out = c.output() != null ? Path.of(c.output())
                : file.getParent().resolve("plans").resolve(c.caseId() == null ? "plan" : c.caseId());
        outputFolder.set(out.toString());
        title.set("Turnmark — case " + (c.caseId() == null ? file.getFileName() : c.caseId()));
        List<ImageChoice> list = new ArrayList<>();
        list.add(new ImageChoice("prone image", Path.of(c.proneImage()), Overlay.Posture.PRONE));
        if (c.supineImage() != null) {
            list.add(new ImageChoice("supine image", Path.of(c.supineImage()), Overlay.Posture.SUPINE));
        }
        if (c.labels() != null) {
            list.add(new ImageChoice("labels", Path.of(c.labels()), Overlay.Posture.PRONE));
        }
        mode.set(Mode.CASE);
        images.setAll(list);
        selectedLesion.set(-1);
        selectedImage.set(null);
        selectedImage.set(list.get(0));
        status.set("Case " + file.getFileName() + " opened; reading the prone image …");
    }

    /** Reads a plan output folder and shows its results, images and predicted positions. */
    public void openPlanFolder(Path dir) {
        error.set("");
        status.set("Reading plan folder " + dir + " …");
        Task<PlanFolder> t = new Task<>() {
            @Override
            protected PlanFolder call() throws IOException {
                return PlanFolder.read(dir);
            }
        };
        t.setOnSucceeded(e -> showPlan(t.getValue()));
        t.setOnFailed(e -> fail("Cannot open the plan folder", t.getException()));
        worker.submit(t);
    }

    private void showPlan(PlanFolder plan) {
        mode.set(Mode.PLAN);
        currentCase.set(null);
        casePath = null;
        proneGrid = null;
        marks.clear();
        lesionIds.clear();
        selectedLesion.set(-1);
        viewer.clear();
        inputs.setAll(plan.inputs());
        results.setAll(plan.results());
        flags.setAll(plan.flags());
        planFolderText.set(plan.describeLocation());
        title.set("Turnmark — plan " + plan.dir().getFileName());
        viewer.overlays().setAll(plan.overlays());
        centreOnPrediction = true;
        images.setAll(plan.images());
        selectedImage.set(null);
        if (!plan.images().isEmpty()) {
            ImageChoice first = plan.images().stream().filter(i -> i.posture() == Overlay.Posture.SUPINE)
                    .findFirst().orElse(plan.images().get(0));
            selectedImage.set(first);
        }
        status.set("Plan " + plan.dir() + " opened" + (plan.images().isEmpty() ? " (no images found)" : "") + ".");
    }

    private void loadImage(ImageChoice choice) {
        if (loadTask != null) {
            loadTask.cancel();
        }
        Task<Volume> t = new Task<>() {
            @Override
            protected Volume call() throws IOException {
                return new NiftiReader().readVolume(choice.path()).volume();
            }
        };
        loadTask = t;
        t.setOnSucceeded(e -> {
            if (selectedImage.get() != choice) {
                return;
            }
            Volume v = t.getValue();
            if (mode.get() == Mode.CASE && choice.posture() == Overlay.Posture.PRONE && proneGrid == null) {
                proneGrid = v.grid();
                resolveVoxelMarks();
            }
            viewer.show(choice, v);
            if (centreOnPrediction) {
                centreOnPrediction = false;
                viewer.overlays().stream().filter(o -> o.posture() == choice.posture()
                        && o.kind() != Overlay.Kind.LESION_MARK).findFirst()
                        .ifPresent(o -> viewer.moveCrosshair(o.centerRasMm()));
            }
            if (mode.get() == Mode.CASE && selectedLesion.get() < 0 && !lesionIds.isEmpty()) {
                selectedLesion.set(0);
                double[] m = marks.get(lesionIds.get(0));
                if (m != null && choice.posture() == Overlay.Posture.PRONE) {
                    viewer.moveCrosshair(m);
                }
            }
            refreshMarkOverlays();
            status.set("Showing " + choice.name() + " (" + v.grid().nx() + " × " + v.grid().ny() + " × "
                    + v.grid().nz() + " voxels).");
        });
        t.setOnFailed(e -> fail("Cannot read " + choice.name(), t.getException()));
        worker.submit(t);
    }

    /** Converts marks given as prone voxel indices to RAS mm once the prone grid is known. */
    private void resolveVoxelMarks() {
        CaseFile c = currentCase.get();
        Map<String, double[]> ordered = new LinkedHashMap<>();
        for (LesionMark m : c.lesions()) {
            double[] p = marks.get(m.id());
            if (p == null && m.positionVoxel() != null) {
                double[] v = m.positionVoxel();
                p = proneGrid.worldOf(v[0], v[1], v[2]);
            }
            if (p != null) {
                ordered.put(m.id(), p);
            }
        }
        marks.clear();
        marks.putAll(ordered);
        loadMarkFields();
    }

    /**
     * A click on a slice at world point {@code rasMm}: moves the crosshair there and, when placing
     * marks is on and the prone image of a case is shown, moves the selected lesion's mark there.
     */
    public void clickAt(double[] rasMm) {
        viewer.moveCrosshair(rasMm);
        if (placeMarkOnClick.get() && mode.get() == Mode.CASE && viewer.posture() == Overlay.Posture.PRONE
                && selectedLesion.get() >= 0 && !running.get()) {
            loadingMark = true;
            markX.set(rasMm[0]);
            markY.set(rasMm[1]);
            markZ.set(rasMm[2]);
            loadingMark = false;
            storeMarkFields();
        }
    }

    /** Moves the crosshair to the selected lesion's mark. */
    public void goToMark() {
        String id = selectedId();
        if (id != null && marks.containsKey(id)) {
            viewer.moveCrosshair(marks.get(id));
        }
    }

    private String selectedId() {
        int s = selectedLesion.get();
        return s >= 0 && s < lesionIds.size() ? lesionIds.get(s) : null;
    }

    private void loadMarkFields() {
        String id = selectedId();
        double[] p = id == null ? null : marks.get(id);
        if (p != null) {
            loadingMark = true;
            markX.set(p[0]);
            markY.set(p[1]);
            markZ.set(p[2]);
            loadingMark = false;
        }
    }

    private void storeMarkFields() {
        if (loadingMark) {
            return;
        }
        String id = selectedId();
        if (id == null || mode.get() != Mode.CASE) {
            return;
        }
        double[] p = {markX.get(), markY.get(), markZ.get()};
        if (!Double.isFinite(p[0]) || !Double.isFinite(p[1]) || !Double.isFinite(p[2])) {
            error.set("A lesion mark needs three finite coordinates in mm.");
            return;
        }
        marks.put(id, p);
        if (proneGrid != null && !ViewerViewModel.contains(proneGrid, p)) {
            error.set(String.format(Locale.ROOT, "Mark %s at (%.1f, %.1f, %.1f) mm lies outside the prone image.",
                    id, p[0], p[1], p[2]));
        } else {
            error.set("");
        }
        refreshMarkOverlays();
        runDisabled.invalidate();
    }

    /** The lesion marks as edited (RAS mm, new arrays), by lesion id in case order. */
    public Map<String, double[]> marks() {
        Map<String, double[]> copy = new LinkedHashMap<>();
        marks.forEach((k, v) -> copy.put(k, v.clone()));
        return copy;
    }

    private void refreshMarkOverlays() {
        if (mode.get() != Mode.CASE) {
            return;
        }
        List<Overlay> list = new ArrayList<>();
        marks.forEach((id, p) -> list.add(new Overlay(id, Overlay.Kind.LESION_MARK, Overlay.Posture.PRONE,
                p.clone(), null)));
        CaseFile c = currentCase.get();
        if (c != null && c.nipples() != null) {
            for (CaseFile.NippleMark n : c.nipples()) {
                list.add(new Overlay("nipple " + n.side(), Overlay.Kind.NIPPLE, Overlay.Posture.PRONE,
                        n.positionRasMm().clone(), null));
            }
        }
        viewer.overlays().setAll(list);
    }

    /** The case with every lesion mark replaced by its edited position (RAS mm). */
    public CaseFile editedCase() {
        CaseFile c = currentCase.get();
        if (c == null) {
            throw new IllegalStateException("no case is open");
        }
        List<LesionMark> lesions = new ArrayList<>();
        for (LesionMark m : c.lesions()) {
            double[] p = marks.get(m.id());
            lesions.add(p == null ? m : new LesionMark(m.id(), m.side(), p.clone(), null, m.radiusMm(), m.label(),
                    m.supinePositionRasMm()));
        }
        return new CaseFile(c.schemaVersion(), c.caseId(), c.description(), c.proneImage(), c.supineImage(),
                c.labels(), c.laterality(), lesions, c.nipples(), c.chestWallPlaneRasMm(), c.model(), c.priors(),
                c.uncertainty(), c.rigidAlignment(), outputFolder.get().isBlank() ? c.output() : outputFolder.get(),
                c.truth());
    }

    /**
     * Saves the case with the edited marks to {@code target} (written to a temporary file in the same
     * folder, then moved into place) and re-reads it to check it.
     */
    public void saveCaseAs(Path target) {
        try {
            Path dest = target.toAbsolutePath().normalize();
            Path tmp = Files.createTempFile(dest.getParent(), ".case-", ".json.tmp");
            try {
                new CaseFileReader().write(editedCase(), tmp);
                new CaseFileReader().read(tmp);
                Files.move(tmp, dest, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
            } finally {
                Files.deleteIfExists(tmp);
            }
            casePath = dest;
            status.set("Case saved to " + dest + ".");
            error.set("");
        } catch (IOException | RuntimeException e) {
            fail("Cannot save the case", e);
        }
    }

    /** Starts the plan in the background; progress and stage names update as it runs. */
    public void runPlan() {
        if (runDisabled.get()) {
            return;
        }
        CaseFile edited = editedCase();
        Path out = Path.of(outputFolder.get()).toAbsolutePath().normalize();
        boolean replace = overwrite.get();
        ProgressTask<Path> t = new ProgressTask<>(p -> launcher.run(edited, out, replace, p));
        runTask = t;
        progress.bind(t.progressProperty());
        stage.bind(t.messageProperty());
        running.set(true);
        error.set("");
        results.clear();
        flags.clear();
        status.set("Planning … results will be written to " + out + ".");
        t.setOnSucceeded(e -> {
            endRun();
            status.set("Plan finished: " + t.getValue() + ".");
            openPlanFolder(t.getValue());
        });
        t.setOnFailed(e -> {
            endRun();
            if (t.getException() instanceof Progress.CancelledException || t.isStopRequested()) {
                status.set("Plan cancelled; nothing was written.");
            } else {
                fail("The plan failed", t.getException());
            }
        });
        t.setOnCancelled(e -> {
            endRun();
            status.set("Plan cancelled; nothing was written.");
        });
        worker.submit(t);
    }

    /** Asks the running plan to stop at its next check. */
    public void cancelPlan() {
        if (runTask != null && running.get()) {
            status.set("Cancelling …");
            runTask.requestStop();
        }
    }

    private void endRun() {
        progress.unbind();
        stage.unbind();
        running.set(false);
        runTask = null;
        runDisabled.invalidate();
    }

    private void fail(String what, Throwable t) {
        Throwable cause = t;
        String msg = cause == null ? null : cause.getMessage();
        if (msg == null || msg.isBlank()) {
            msg = cause == null ? "unknown error" : cause.getClass().getSimpleName();
        }
        LOG.log(Level.WARNING, what, t);
        error.set(what + ": " + msg);
        status.set(what + ".");
    }

    /** Stops the worker threads (running work is interrupted). */
    public void shutdown() {
        if (runTask != null) {
            runTask.cancel(true);
        }
        worker.shutdownNow();
    }

    public ViewerViewModel viewer() {
        return viewer;
    }

    public ObjectProperty<Mode> modeProperty() {
        return mode;
    }

    public StringProperty titleProperty() {
        return title;
    }

    /** The open case's inputs in plain words. */
    public ObservableList<InfoRow> inputs() {
        return inputs;
    }

    /** Images the viewer can show. */
    public ObservableList<ImageChoice> images() {
        return images;
    }

    public ObjectProperty<ImageChoice> selectedImageProperty() {
        return selectedImage;
    }

    public ObservableList<String> lesionIds() {
        return lesionIds;
    }

    public IntegerProperty selectedLesionProperty() {
        return selectedLesion;
    }

    /** Selected lesion mark, x (RAS mm, + = patient right). */
    public DoubleProperty markXProperty() {
        return markX;
    }

    /** Selected lesion mark, y (RAS mm, + = anterior). */
    public DoubleProperty markYProperty() {
        return markY;
    }

    /** Selected lesion mark, z (RAS mm, + = superior). */
    public DoubleProperty markZProperty() {
        return markZ;
    }

    public BooleanProperty placeMarkOnClickProperty() {
        return placeMarkOnClick;
    }

    public StringProperty outputFolderProperty() {
        return outputFolder;
    }

    public BooleanProperty overwriteProperty() {
        return overwrite;
    }

    public ReadOnlyBooleanProperty runningProperty() {
        return running.getReadOnlyProperty();
    }

    /** True when a plan cannot be started now (no case, no image yet, no marks, already running, or no planner). */
    public BooleanBinding runDisabledProperty() {
        return runDisabled;
    }

    /** Whether this build can run plans at all. */
    public boolean canPlan() {
        return launcher != null;
    }

    /** Fraction of the current stage done, in [0, 1]. */
    public DoubleProperty progressProperty() {
        return progress;
    }

    /** Name of the stage running. */
    public StringProperty stageProperty() {
        return stage;
    }

    public ObservableList<ResultRow> results() {
        return results;
    }

    /** Quality flags in plain words. */
    public ObservableList<String> flags() {
        return flags;
    }

    /** Output folder and report path of the plan shown. */
    public StringProperty planFolderTextProperty() {
        return planFolderText;
    }

    public StringProperty statusProperty() {
        return status;
    }

    /** Last error as one short line; empty when none. */
    public StringProperty errorProperty() {
        return error;
    }

    public ReadOnlyObjectProperty<CaseFile> currentCaseProperty() {
        return currentCase.getReadOnlyProperty();
    }

    /** The case file shown, or null. */
    public Path casePath() {
        return casePath;
    }
}
