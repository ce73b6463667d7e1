package org.turnmark.app.export;

import java.io.IOException;
import java.nio.file.Path;

import com.fasterxml.jackson.annotation.JsonInclude;
import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.PropertyNamingStrategies;
import com.fasterxml.jackson.databind.SerializationFeature;
import com.fasterxml.jackson.databind.json.JsonMapper;

import org.turnmark.app.pipeline.PlanResult;

/**
 * Writes and reads {@code plan.json}: the whole {@link PlanResult} with snake-case keys, absent
 * values omitted, the caution as the first field. Reading is strict (unknown keys fail) so that a
 * round trip proves nothing is lost. Stateless; thread safe.
 */
public final class PlanJson {

    private static final ObjectMapper MAPPER = JsonMapper.builder()
            .propertyNamingStrategy(PropertyNamingStrategies.SNAKE_CASE)
            .serializationInclusion(JsonInclude.Include.NON_NULL)
            .enable(SerializationFeature.INDENT_OUTPUT)
            .enable(DeserializationFeature.FAIL_ON_UNKNOWN_PROPERTIES)
            .build();

    private PlanJson() {
    }

    /** Writes the plan (to a temporary name beside {@code path}, then moved into place). */
    public static void write(PlanResult plan, Path path) throws IOException {
        AtomicFiles.write(path, out -> MAPPER.writeValue(out, plan));
    }

    /** Reads a plan written by {@link #write}. */
    public static PlanResult read(Path path) throws IOException {
        return MAPPER.readValue(path.toFile(), PlanResult.class);
    }

    /** The plan as a JSON string. */
    public static String toJson(PlanResult plan) throws IOException {
        return MAPPER.writeValueAsString(plan);
    }
}
