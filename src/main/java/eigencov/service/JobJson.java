package eigencov.service;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.ObjectMapper;

/** Jobs' requests and results travel through the store as JSON text; reading one back cannot fail unless the store was tampered with. */
final class JobJson {
    private JobJson() {
    }

    static <T> T read(ObjectMapper mapper, String json, Class<T> type) {
        try {
            return mapper.readValue(json, type);
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("a stored job cannot be read as " + type.getSimpleName() + ": " + e.getOriginalMessage(), e);
        }
    }

    static String write(ObjectMapper mapper, Object value) {
        try {
            return mapper.writeValueAsString(value);
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("cannot write " + value.getClass().getSimpleName() + " as JSON: " + e.getOriginalMessage(), e);
        }
    }
}
