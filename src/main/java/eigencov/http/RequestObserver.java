package eigencov.http;

/** Told about every finished request, after the response is written (the metrics hook). */
@FunctionalInterface
public interface RequestObserver {
    /** Observes nothing. */
    RequestObserver NONE = (method, route, status, durationNanos) -> { };

    /**
     * @param route the matched route template ({@code /v1/panels/{panel}}), or {@value HttpApi#UNMATCHED_ROUTE}
     */
    void finished(String method, String route, int status, long durationNanos);
}
