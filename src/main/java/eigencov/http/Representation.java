package eigencov.http;

import java.util.List;
import java.util.Locale;

/**
 * The response formats of the query endpoints, chosen from the request's {@code Accept} header
 * (RFC 9110 section 12.5.1: the most specific matching media range gives the quality; the highest
 * quality wins; ties go to the endpoint's order of preference). No header means JSON.
 */
enum Representation {
    JSON("application/json", "application/json", false),
    CSV("text/csv", "text/csv; charset=utf-8; header=present", false),
    /** NumPy {@code .npy} version 1.0, see {@link Npy}: bytes, so its Content-Type has no charset. */
    NPY(Npy.MEDIA_TYPE, Npy.MEDIA_TYPE, true);

    final String mediaType;
    final String contentType;
    /** The body is bytes, not text: no character encoding belongs in its Content-Type. */
    final boolean binary;

    Representation(String mediaType, String contentType, boolean binary) {
        this.mediaType = mediaType;
        this.contentType = contentType;
        this.binary = binary;
    }

    /**
     * @param accept  the Accept header, may be null
     * @param offered formats of the endpoint, most preferred first
     * @throws ApiException 406 when none of {@code offered} is acceptable
     */
    static Representation negotiate(String accept, List<Representation> offered) {
        if (accept == null || accept.isBlank()) return offered.get(0);
        String[] ranges = accept.split(",");
        Representation best = null;
        double bestQ = 0;
        for (Representation r : offered) {
            double q = quality(ranges, r.mediaType);
            if (q > bestQ) {
                best = r;
                bestQ = q;
            }
        }
        if (best == null) {
            throw new ApiException(406, "not-acceptable", "Not acceptable", "this endpoint answers in "
                    + String.join(", ", offered.stream().map(r -> r.mediaType).toList()) + "; Accept was '" + accept + "'",
                    List.of(FieldError.field("Accept", "none of the offered media types is acceptable")));
        }
        return best;
    }

    /** Quality the ranges give {@code type}: that of the most specific matching range, 0 when none matches. */
    private static double quality(String[] ranges, String type) {
        int bestSpecificity = -1;
        double q = 0;
        String major = type.substring(0, type.indexOf('/'));
        for (String raw : ranges) {
            String[] parts = raw.split(";");
            String range = parts[0].trim().toLowerCase(Locale.ROOT);
            int specificity;
            if (range.equals(type)) specificity = 2;
            else if (range.equals(major + "/*")) specificity = 1;
            else if (range.equals("*/*")) specificity = 0;
            else continue;
            if (specificity > bestSpecificity) {
                bestSpecificity = specificity;
                q = qParameter(parts);
            }
        }
        return q;
    }

    private static double qParameter(String[] parts) {
        for (int i = 1; i < parts.length; i++) {
            String p = parts[i].trim();
            if (p.length() > 2 && (p.charAt(0) == 'q' || p.charAt(0) == 'Q') && p.charAt(1) == '=') {
                try {
                    double q = Double.parseDouble(p.substring(2).trim());
                    return q >= 0 && q <= 1 ? q : 0;
                } catch (NumberFormatException e) {
                    return 0;
                }
            }
        }
        return 1;
    }
}
