package eigencov.service;

import java.util.Locale;
import java.util.Optional;

/** The body formats a returns upload may take. */
public enum ReturnsFormat {
    /** {@code {"returns": [{"date", "ticker", "value"}]}} */
    JSON,
    /** {@code text/csv} with the header {@code date,ticker,value} */
    CSV;

    /** The format of a Content-Type header ({@code application/json}, {@code text/csv}, parameters ignored). */
    public static Optional<ReturnsFormat> ofContentType(String contentType) {
        if (contentType == null) return Optional.empty();
        int semi = contentType.indexOf(';');
        String mime = (semi < 0 ? contentType : contentType.substring(0, semi)).strip().toLowerCase(Locale.ROOT);
        return switch (mime) {
            case "application/json" -> Optional.of(JSON);
            case "text/csv" -> Optional.of(CSV);
            default -> Optional.empty();
        };
    }
}
