package org.turnmark.app.gui;

import java.nio.file.Path;
import java.util.List;

import javafx.application.Application;
import javafx.scene.Scene;
import javafx.stage.Stage;

/**
 * The desktop application. Started through {@link GuiLauncher} (a plain class, so that the shaded jar
 * can start JavaFX from the classpath); the first raw parameter, if any, is a case file or a plan
 * folder to open.
 */
public final class TurnmarkApp extends Application {

    private MainViewModel vm;

    @Override
    public void start(Stage stage) {
        vm = new MainViewModel(PlanLaunchers.pipeline());
        MainView view = new MainView(vm);
        Scene scene = new Scene(view, 1440, 920);
        stage.titleProperty().bind(vm.titleProperty());
        stage.setScene(scene);
        stage.show();
        List<String> raw = getParameters().getRaw();
        if (!raw.isEmpty()) {
            vm.open(Path.of(raw.get(0)));
        }
    }

    @Override
    public void stop() {
        if (vm != null) {
            vm.shutdown();
        }
    }
}
