package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class CaseFileReaderTest {

    @TempDir
    Path dir;

    private Path caseFile;

    @BeforeEach
    void images() throws IOException {
        Files.createDirectories(dir.resolve("img"));
        Files.write(dir.resolve("img/prone.nii.gz"), new byte[] {1});
        Files.write(dir.resolve("img/supine.nii.gz"), new byte[] {1});
        caseFile = dir.resolve("case.json");
    }

    private CaseFile read(String json) throws IOException {
        Files.writeString(caseFile, json, StandardCharsets.UTF_8);
        return new CaseFileReader().read(caseFile);
    }

    private CaseFormatException fails(String json) throws IOException {
        Files.writeString(caseFile, json, StandardCharsets.UTF_8);
        return assertThrows(CaseFormatException.class, () -> new CaseFileReader().read(caseFile));
    }

    private static final String MINIMAL = "{\"schema_version\": 1, \"prone_image\": \"img/prone.nii.gz\","
            + " \"laterality\": \"left\", \"lesions\": [{\"id\": \"L1\", \"position_ras_mm\": [10, 20, 30]}]}";

    @Test
    void minimalCaseGetsDefaultsAndAbsolutePaths() throws IOException {
        CaseFile c = read(MINIMAL);
        assertEquals(dir.resolve("img/prone.nii.gz").toAbsolutePath().normalize().toString(), c.proneImage());
        assertNull(c.supineImage());
        assertEquals("left", c.laterality());
        assertArrayEquals(new double[] {10, 20, 30}, c.lesions().get(0).positionRasMm());
        assertEquals(CaseFile.ModelOptions.DEFAULT_ELEMENT_SIZE_MM, c.model().elementSizeMm());
        assertEquals(CaseFileReader.DEFAULT_FAT, c.priors().fat());
        assertEquals(CaseFileReader.DEFAULT_MECHANICS_SUPINE_SD_MM, c.priors().mechanicsSupineSdMm());
        assertEquals(CaseFile.UncertaintyOptions.DEFAULT_SAMPLES, c.uncertainty().samples());
        assertEquals("sobol", c.uncertainty().design());
        assertTrue(c.nipples().isEmpty());
    }

    @Test
    void unknownTopLevelKeyIsNamed() throws IOException {
        CaseFormatException e = fails(MINIMAL.replace("\"laterality\"", "\"lateralty\": \"x\", \"laterality\""));
        assertTrue(e.getMessage().contains("lateralty"), e.getMessage());
        assertTrue(e.getMessage().contains("case.json"), e.getMessage());
    }

    @Test
    void unknownNestedKeyIsNamedWithItsPath() throws IOException {
        CaseFormatException e = fails(MINIMAL.replace("}]}", ", \"radius\": 4}]}"));
        assertEquals("lesions[0].radius", e.key());
        assertTrue(e.getMessage().contains("radius_mm"), "lists the known keys: " + e.getMessage());
    }

    @Test
    void missingProneImageFileIsNamed() throws IOException {
        CaseFormatException e = fails(MINIMAL.replace("img/prone.nii.gz", "img/none.nii.gz"));
        assertEquals("prone_image", e.key());
        assertTrue(e.getMessage().contains("none.nii.gz"));
    }

    @Test
    void missingSupineFileIsAnErrorButAbsentSupineIsFine() throws IOException {
        CaseFormatException e = fails(MINIMAL.replace("\"laterality\"", "\"supine_image\": \"gone.nii\", \"laterality\""));
        assertEquals("supine_image", e.key());
        CaseFile c = read(MINIMAL.replace("\"laterality\"", "\"supine_image\": \"img/supine.nii.gz\", \"laterality\""));
        assertTrue(c.hasSupine());
    }

    @Test
    void wrongSchemaVersionIsRejected() throws IOException {
        CaseFormatException e = fails(MINIMAL.replace("\"schema_version\": 1", "\"schema_version\": 2"));
        assertEquals("schema_version", e.key());
        assertTrue(e.getMessage().contains("2"));
        assertEquals("schema_version", fails(MINIMAL.replace("\"schema_version\": 1,", "")).key());
    }

    @Test
    void lesionNeedsExactlyOnePosition() throws IOException {
        assertEquals("lesions[0]", fails(MINIMAL.replace("\"position_ras_mm\": [10, 20, 30]",
                "\"position_ras_mm\": [1, 2, 3], \"position_voxel\": [1, 2, 3]")).key());
        assertEquals("lesions[0].position_ras_mm", fails(MINIMAL.replace("[10, 20, 30]", "[10, 20]")).key());
    }

    @Test
    void duplicateLesionIdsAndSidesAreRejected() throws IOException {
        assertEquals("lesions[1].id", fails(MINIMAL.replace("}]}",
                "}, {\"id\": \"L1\", \"position_voxel\": [1, 2, 3]}]}")).key());
        assertEquals("nipples[1].side", fails(MINIMAL.replace("}]}", "}], \"nipples\": ["
                + "{\"side\": \"left\", \"position_ras_mm\": [0, 0, 0]},"
                + "{\"side\": \"left\", \"position_ras_mm\": [1, 0, 0]}]}")).key());
    }

    @Test
    void outOfRangePriorsAreRejectedWithTheirKey() throws IOException {
        assertEquals("priors.fat.mu_kpa_median", fails(MINIMAL.replace("}]}",
                "}], \"priors\": {\"fat\": {\"mu_kpa_median\": -1}}}")).key());
        assertEquals("priors.nu", fails(MINIMAL.replace("}]}",
                "}], \"priors\": {\"nu\": {\"min\": 0.4, \"max\": 0.5}}}")).key());
        assertEquals("priors.chest_wall_sliding_probability", fails(MINIMAL.replace("}]}",
                "}], \"priors\": {\"chest_wall_sliding_probability\": 1.5}}")).key());
        assertEquals("model.element_size_mm", fails(MINIMAL.replace("}]}",
                "}], \"model\": {\"element_size_mm\": 0}}")).key());
        assertEquals("priors.mechanics_supine_sd_mm", fails(MINIMAL.replace("}]}",
                "}], \"priors\": {\"mechanics_supine_sd_mm\": -0.5}}")).key());
        assertEquals("priors.mechanics_prone_sd_mm", fails(MINIMAL.replace("}]}",
                "}], \"priors\": {\"mechanics_prone_sd_mm\": 51}}")).key());
        assertEquals("priors.mechanics_prone_scale", fails(MINIMAL.replace("}]}",
                "}], \"priors\": {\"mechanics_prone_scale\": 0.5}}")).key());
        assertEquals("priors.mechanics_prone_scale_wide_field", fails(MINIMAL.replace("}]}",
                "}], \"priors\": {\"mechanics_prone_scale_wide_field\": 11}}")).key());
        assertEquals("rigid_alignment", fails(MINIMAL.replace("}]}", "}], \"rigid_alignment\": \"torso\"}")).key());
    }

    @Test
    void givenMechanicsSupineSdIsUsed() throws IOException {
        CaseFile c = read(MINIMAL.replace("}]}", "}], \"priors\": {\"mechanics_supine_sd_mm\": 2.5}}"));
        assertEquals(2.5, c.priors().mechanicsSupineSdMm());
        assertEquals(CaseFileReader.DEFAULT_MECHANICS_PRONE_SD_MM, c.priors().mechanicsProneSdMm());
        c = read(MINIMAL.replace("}]}", "}], \"priors\": {\"mechanics_prone_sd_mm\": 3.5}}"));
        assertEquals(3.5, c.priors().mechanicsProneSdMm());
        assertEquals(CaseFileReader.DEFAULT_MECHANICS_PRONE_SCALE, c.priors().mechanicsProneScale());
        c = read(MINIMAL.replace("}]}", "}], \"priors\": {\"mechanics_prone_scale\": 2.5}}"));
        assertEquals(2.5, c.priors().mechanicsProneScale());
        assertEquals(CaseFileReader.DEFAULT_MECHANICS_PRONE_SCALE_WIDE_FIELD, c.priors().mechanicsProneScaleWideField());
        c = read(MINIMAL.replace("}]}", "}], \"priors\": {\"mechanics_prone_scale_wide_field\": 4}}"));
        assertEquals(4.0, c.priors().mechanicsProneScaleWideField());
        assertEquals(CaseFile.ALIGN_WHOLE_IMAGE, c.rigidAlignment(), "the default");
        c = read(MINIMAL.replace("}]}", "}], \"rigid_alignment\": \"Chest_Wall\"}"));
        assertEquals(CaseFile.ALIGN_CHEST_WALL, c.rigidAlignment());
    }

    @Test
    void wrongTypeIsReportedWithItsKey() throws IOException {
        CaseFormatException e = fails(MINIMAL.replace("[10, 20, 30]", "\"ten\""));
        assertEquals("lesions[0].position_ras_mm", e.key());
    }

    @Test
    void malformedJsonReportsLine() throws IOException {
        CaseFormatException e = fails("{\n\"schema_version\": 1,\n\"prone_image\" \"x\"}");
        assertTrue(e.getMessage().contains("line 3"), e.getMessage());
    }

    @Test
    void collinearChestWallPlaneIsRejected() throws IOException {
        assertEquals("chest_wall_plane_ras_mm", fails(MINIMAL.replace("}]}",
                "}], \"chest_wall_plane_ras_mm\": [[0,0,0],[1,1,1],[2,2,2]]}")).key());
    }

    @Test
    void writtenCaseReadsBackIdentically() throws IOException {
        CaseFile c = read(MINIMAL.replace("\"laterality\"", "\"supine_image\": \"img/supine.nii.gz\","
                + " \"nipples\": [{\"side\": \"left\", \"position_ras_mm\": [-80, 100, 10]}], \"laterality\""));
        Path copy = dir.resolve("copy.json");
        new CaseFileReader().write(c, copy);
        CaseFile d = new CaseFileReader().read(copy);
        assertEquals(c.proneImage(), d.proneImage());
        assertEquals(c.supineImage(), d.supineImage());
        assertEquals(c.priors(), d.priors());
        assertEquals(c.model(), d.model());
        assertEquals(c.uncertainty(), d.uncertainty());
        assertArrayEquals(c.nipples().get(0).positionRasMm(), d.nipples().get(0).positionRasMm());
        assertArrayEquals(c.lesions().get(0).positionRasMm(), d.lesions().get(0).positionRasMm());
    }
}
