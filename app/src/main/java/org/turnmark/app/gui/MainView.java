package org.turnmark.app.gui;

import java.io.File;
import java.nio.file.Path;
import java.util.Locale;
import java.util.function.Function;

import javafx.beans.binding.Bindings;
import javafx.beans.property.DoubleProperty;
import javafx.beans.property.ReadOnlyStringWrapper;
import javafx.geometry.Insets;
import javafx.geometry.Pos;
import javafx.scene.control.Button;
import javafx.scene.control.CheckBox;
import javafx.scene.control.ComboBox;
import javafx.scene.control.Label;
import javafx.scene.control.ListView;
import javafx.scene.control.ProgressBar;
import javafx.scene.control.Slider;
import javafx.scene.control.SplitPane;
import javafx.scene.control.TableColumn;
import javafx.scene.control.TableView;
import javafx.scene.control.TextField;
import javafx.scene.control.TextFormatter;
import javafx.scene.control.TitledPane;
import javafx.scene.control.ToolBar;
import javafx.scene.control.Tooltip;
import javafx.scene.layout.BorderPane;
import javafx.scene.layout.ColumnConstraints;
import javafx.scene.layout.FlowPane;
import javafx.scene.layout.GridPane;
import javafx.scene.layout.HBox;
import javafx.scene.layout.Priority;
import javafx.scene.layout.RowConstraints;
import javafx.scene.layout.VBox;
import javafx.scene.shape.Rectangle;
import javafx.stage.DirectoryChooser;
import javafx.stage.FileChooser;
import javafx.util.converter.DoubleStringConverter;

/**
 * The main window's content: the research-use banner (always visible), a toolbar, the inputs and
 * lesion-mark panel with the run controls, the three slice views with image choice, grey window and
 * legend, the results with quality flags, and a status line. Binding only; behaviour is in
 * {@link MainViewModel}.
 */
public final class MainView extends BorderPane {

    private final MainViewModel vm;

    public MainView(MainViewModel vm) {
        this.vm = vm;
        setTop(new VBox(banner(), toolbar()));
        setLeft(sidePanel());
        SplitPane center = new SplitPane(viewerGrid(), resultsPanel());
        center.setOrientation(javafx.geometry.Orientation.VERTICAL);
        center.setDividerPositions(0.68);
        setCenter(center);
        setBottom(statusBar());
    }

    private Label banner() {
        Label l = new Label(vm.caution());
        l.setId("caution-banner");
        l.setWrapText(true);
        l.setMaxWidth(Double.MAX_VALUE);
        l.setPadding(new Insets(6, 10, 6, 10));
        l.setStyle("-fx-background-color: #8a1c1c; -fx-text-fill: white; -fx-font-weight: bold;");
        return l;
    }

    private ToolBar toolbar() {
        Button openCase = new Button("Open case…");
        openCase.setId("open-case");
        openCase.setOnAction(e -> {
            FileChooser fc = new FileChooser();
            fc.setTitle("Open a case file");
            fc.getExtensionFilters().add(new FileChooser.ExtensionFilter("Case files (*.json)", "*.json"));
            File f = fc.showOpenDialog(getScene().getWindow());
            if (f != null) {
                vm.openCase(f.toPath());
            }
        });
        Button openPlan = new Button("Open plan folder…");
        openPlan.setId("open-plan");
        openPlan.setOnAction(e -> {
            DirectoryChooser dc = new DirectoryChooser();
            dc.setTitle("Open a plan output folder (holding plan.json)");
            File f = dc.showDialog(getScene().getWindow());
            if (f != null) {
                vm.openPlanFolder(f.toPath());
            }
        });
        Button save = new Button("Save case as…");
        save.setId("save-case");
        save.disableProperty().bind(vm.modeProperty().isNotEqualTo(MainViewModel.Mode.CASE));
        save.setOnAction(e -> {
            FileChooser fc = new FileChooser();
            fc.setTitle("Save the case with the edited marks");
            Path cp = vm.casePath();
            if (cp != null) {
                fc.setInitialDirectory(cp.getParent().toFile());
                fc.setInitialFileName(cp.getFileName().toString().replaceAll("\\.json$", "") + "-edited.json");
            }
            File f = fc.showSaveDialog(getScene().getWindow());
            if (f != null) {
                vm.saveCaseAs(f.toPath());
            }
        });
        Label title = new Label();
        title.textProperty().bind(vm.titleProperty());
        title.setStyle("-fx-font-weight: bold;");
        return new ToolBar(openCase, openPlan, save, new Label("   "), title);
    }

    private VBox sidePanel() {
        TableView<InfoRow> inputs = twoColumnTable(vm.inputs(), "Input", InfoRow::key, "Value", InfoRow::value);
        inputs.setId("inputs-table");
        inputs.setPrefHeight(260);
        TitledPane inputsPane = new TitledPane("Inputs", inputs);

        ComboBox<String> lesion = new ComboBox<>(vm.lesionIds());
        lesion.setId("lesion-choice");
        lesion.getSelectionModel().selectedIndexProperty().addListener((o, a, b) -> vm.selectedLesionProperty()
                .set(b.intValue()));
        vm.selectedLesionProperty().addListener((o, a, b) -> {
            if (lesion.getSelectionModel().getSelectedIndex() != b.intValue()) {
                lesion.getSelectionModel().select(b.intValue());
            }
        });
        GridPane mark = new GridPane();
        mark.setHgap(6);
        mark.setVgap(4);
        mark.addRow(0, new Label("Lesion"), lesion);
        mark.addRow(1, new Label("x (R+)"), coordField("mark-x", vm.markXProperty()), new Label("mm"));
        mark.addRow(2, new Label("y (A+)"), coordField("mark-y", vm.markYProperty()), new Label("mm"));
        mark.addRow(3, new Label("z (S+)"), coordField("mark-z", vm.markZProperty()), new Label("mm"));
        CheckBox place = new CheckBox("Click on the prone image moves the mark");
        place.setId("place-on-click");
        place.selectedProperty().bindBidirectional(vm.placeMarkOnClickProperty());
        Button goTo = new Button("Go to mark");
        goTo.setOnAction(e -> vm.goToMark());
        VBox markBox = new VBox(6, mark, place, goTo);
        markBox.disableProperty().bind(vm.modeProperty().isNotEqualTo(MainViewModel.Mode.CASE));
        TitledPane markPane = new TitledPane("Lesion mark (world RAS mm)", markBox);

        TextField out = new TextField();
        out.setId("output-folder");
        out.textProperty().bindBidirectional(vm.outputFolderProperty());
        CheckBox overwrite = new CheckBox("Replace an existing output folder");
        overwrite.selectedProperty().bindBidirectional(vm.overwriteProperty());
        Button run = new Button("Run plan");
        run.setId("run-plan");
        run.setDefaultButton(true);
        run.disableProperty().bind(vm.runDisabledProperty());
        run.setOnAction(e -> vm.runPlan());
        if (!vm.canPlan()) {
            run.setTooltip(new Tooltip("This build has no planner; save the case and use 'turnmark plan'."));
        }
        Button cancel = new Button("Cancel");
        cancel.setId("cancel-plan");
        cancel.disableProperty().bind(vm.runningProperty().not());
        cancel.setOnAction(e -> vm.cancelPlan());
        ProgressBar bar = new ProgressBar();
        bar.setId("plan-progress");
        bar.setMaxWidth(Double.MAX_VALUE);
        bar.progressProperty().bind(vm.progressProperty());
        bar.visibleProperty().bind(vm.runningProperty());
        Label stage = new Label();
        stage.setId("plan-stage");
        stage.textProperty().bind(Bindings.when(vm.runningProperty())
                .then(Bindings.concat("Stage: ", vm.stageProperty(), "  (",
                        Bindings.format(Locale.ROOT, "%.0f", vm.progressProperty().multiply(100)), " %)"))
                .otherwise(""));
        VBox runBox = new VBox(6, new Label("Output folder"), out, overwrite, new HBox(8, run, cancel), bar, stage);
        TitledPane runPane = new TitledPane("Plan", runBox);

        VBox side = new VBox(inputsPane, markPane, runPane);
        side.setPrefWidth(360);
        side.setPadding(new Insets(4));
        return side;
    }

    private TextField coordField(String id, DoubleProperty p) {
        TextField f = new TextField();
        f.setId(id);
        f.setPrefColumnCount(8);
        DoubleStringConverter conv = new DoubleStringConverter() {
            @Override
            public String toString(Double d) {
                return d == null ? "" : String.format(Locale.ROOT, "%.2f", d);
            }

            @Override
            public Double fromString(String s) {
                try {
                    double d = Double.parseDouble(s.trim());
                    return Double.isFinite(d) ? d : p.get();
                } catch (NumberFormatException e) {
                    return p.get();
                }
            }
        };
        TextFormatter<Double> fmt = new TextFormatter<>(conv, p.get());
        f.setTextFormatter(fmt);
        // Bidirectional bindings hold their ends weakly: keep the boxed view of p alive with the field.
        javafx.beans.property.ObjectProperty<Double> boxed = p.asObject();
        f.getProperties().put(DoubleProperty.class, boxed);
        fmt.valueProperty().bindBidirectional(boxed);
        return f;
    }

    private GridPane viewerGrid() {
        ViewerViewModel viewer = vm.viewer();
        GridPane grid = new GridPane();
        grid.setHgap(3);
        grid.setVgap(3);
        grid.setStyle("-fx-background-color: #0b0f14;");
        SliceView axial = new SliceView(viewer, SlicePlane.AXIAL, vm::clickAt);
        SliceView sagittal = new SliceView(viewer, SlicePlane.SAGITTAL, vm::clickAt);
        SliceView coronal = new SliceView(viewer, SlicePlane.CORONAL, vm::clickAt);
        grid.add(axial, 0, 0);
        grid.add(sagittal, 1, 0);
        grid.add(coronal, 0, 1);
        grid.add(viewerControls(), 1, 1);
        for (int i = 0; i < 2; i++) {
            ColumnConstraints cc = new ColumnConstraints();
            cc.setPercentWidth(50);
            cc.setHgrow(Priority.ALWAYS);
            grid.getColumnConstraints().add(cc);
            RowConstraints rc = new RowConstraints();
            rc.setPercentHeight(50);
            rc.setVgrow(Priority.ALWAYS);
            grid.getRowConstraints().add(rc);
        }
        return grid;
    }

    private VBox viewerControls() {
        ViewerViewModel viewer = vm.viewer();
        ComboBox<ImageChoice> images = new ComboBox<>(vm.images());
        images.setId("image-choice");
        images.valueProperty().bindBidirectional(vm.selectedImageProperty());
        Slider level = new Slider();
        Slider width = new Slider();
        width.setMin(DisplayWindow.MIN_WIDTH);
        // Slider ranges follow the image; set (not bound) because a Slider adjusts its own min/max.
        Runnable ranges = () -> {
            double lo = viewer.valueMinProperty().get();
            double hi = viewer.valueMaxProperty().get();
            setRange(level, lo, hi);
            setRange(width, DisplayWindow.MIN_WIDTH, Math.max(2 * (hi - lo), 2 * DisplayWindow.MIN_WIDTH));
        };
        viewer.valueMinProperty().addListener((o, a, b) -> ranges.run());
        viewer.valueMaxProperty().addListener((o, a, b) -> ranges.run());
        ranges.run();
        level.valueProperty().bindBidirectional(viewer.windowCenterProperty());
        width.valueProperty().bindBidirectional(viewer.windowWidthProperty());
        Button auto = new Button("Auto window");
        auto.setOnAction(e -> viewer.resetWindow());
        Label levelText = new Label();
        levelText.textProperty().bind(Bindings.format(Locale.ROOT, "level %.4g, window %.4g (image units)",
                viewer.windowCenterProperty(), viewer.windowWidthProperty()));
        Label cross = new Label();
        cross.setId("crosshair-text");
        cross.setWrapText(true);
        cross.textProperty().bind(viewer.crosshairTextProperty());
        FlowPane legend = new FlowPane(10, 4);
        for (Overlay.Kind k : Overlay.Kind.values()) {
            Rectangle r = new Rectangle(10, 10, SliceView.colorOf(k));
            Label l = new Label(k.text(), r);
            l.setStyle("-fx-text-fill: #c9d3dd;");
            legend.getChildren().add(l);
        }
        Label ellipseNote = new Label("Outlines: 95 % ellipsoid cut by the slice. Faded marks lie off the slice.");
        ellipseNote.setWrapText(true);
        VBox box = new VBox(6, new Label("Image"), images, new Label("Level"), level, new Label("Window"), width,
                new HBox(8, auto, levelText), cross, legend, ellipseNote);
        box.setPadding(new Insets(8));
        box.setStyle("-fx-background-color: #1b232c; -fx-base: #2b3540; -fx-text-fill: #c9d3dd;");
        box.getChildren().filtered(n -> n instanceof Label).forEach(n -> n.setStyle("-fx-text-fill: #c9d3dd;"));
        return box;
    }

    private static void setRange(Slider s, double lo, double hi) {
        if (lo > s.getMax()) {
            s.setMax(hi);
            s.setMin(lo);
        } else {
            s.setMin(lo);
            s.setMax(hi);
        }
    }

    private BorderPane resultsPanel() {
        TableView<ResultRow> table = new TableView<>(vm.results());
        table.setId("results-table");
        table.getColumns().add(column("Lesion", ResultRow::lesion, 70));
        table.getColumns().add(column("Method", ResultRow::method, 130));
        table.getColumns().add(column("Frame", ResultRow::frame, 150));
        table.getColumns().add(column("Position, RAS", ResultRow::positionRas, 170));
        table.getColumns().add(column("95 % ellipsoid semi-axes", ResultRow::semiAxes95, 170));
        table.getColumns().add(column("Descriptors", ResultRow::descriptors, 420));
        table.setPlaceholder(new Label("No results yet: run the plan or open a plan folder."));
        ListView<String> flags = new ListView<>(vm.flags());
        flags.setId("flags-list");
        flags.setCellFactory(list -> new javafx.scene.control.ListCell<>() {
            @Override
            protected void updateItem(String item, boolean empty) {
                super.updateItem(item, empty);
                setText(empty ? null : item);
                setWrapText(true);
                setPrefWidth(0);
            }
        });
        flags.setPrefWidth(340);
        flags.setPlaceholder(new Label("No quality flags."));
        Label where = new Label();
        where.setId("plan-folder");
        where.textProperty().bind(vm.planFolderTextProperty());
        BorderPane p = new BorderPane();
        p.setCenter(table);
        VBox right = new VBox(4, new Label("Quality flags"), flags);
        VBox.setVgrow(flags, Priority.ALWAYS);
        p.setRight(right);
        p.setBottom(where);
        p.setPadding(new Insets(4));
        return p;
    }

    private HBox statusBar() {
        Label status = new Label();
        status.setId("status");
        status.textProperty().bind(vm.statusProperty());
        Label error = new Label();
        error.setId("error");
        error.setStyle("-fx-text-fill: #d1242f; -fx-font-weight: bold;");
        error.textProperty().bind(vm.errorProperty());
        HBox bar = new HBox(16, status, error);
        bar.setAlignment(Pos.CENTER_LEFT);
        bar.setPadding(new Insets(3, 8, 3, 8));
        return bar;
    }

    private static <T> TableView<T> twoColumnTable(javafx.collections.ObservableList<T> items, String h1,
                                                   Function<T, String> f1, String h2, Function<T, String> f2) {
        TableView<T> t = new TableView<>(items);
        t.getColumns().add(column(h1, f1, 110));
        t.getColumns().add(column(h2, f2, 230));
        t.setColumnResizePolicy(TableView.CONSTRAINED_RESIZE_POLICY_FLEX_LAST_COLUMN);
        t.setPlaceholder(new Label("No case open."));
        return t;
    }

    private static <T> TableColumn<T, String> column(String header, Function<T, String> f, double width) {
        TableColumn<T, String> c = new TableColumn<>(header);
        c.setCellValueFactory(cd -> new ReadOnlyStringWrapper(f.apply(cd.getValue())));
        c.setPrefWidth(width);
        return c;
    }
}
