package eigencov.service;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.ObjectReader;
import eigencov.math.AlignmentReport;
import eigencov.math.Basis;
import eigencov.math.Exclusion;
import eigencov.math.FactorCountReport;
import eigencov.math.FactorModel;
import eigencov.math.FitResult;
import eigencov.math.ImputationReport;
import eigencov.store.FitData;
import eigencov.store.StoreException;

import java.util.List;

/** Converts the engine's {@link FitResult} to the stored {@link FitData} and back, losslessly. */
public final class FitCodec {

    /** The engine's reports, stored as one JSON document beside the arrays. */
    public record Reports(List<Exclusion> excluded, FactorCountReport factorCount, ImputationReport imputation,
                          AlignmentReport alignment, double effectiveObservations, long computeNanos, int rank,
                          double totalVariance, Basis basis) {
    }

    private final ObjectMapper mapper;
    private final ObjectReader reportsReader;

    public FitCodec(ObjectMapper mapper) {
        this.mapper = mapper;
        // Lenient on read: reports written by an older engine version may carry fields this one dropped.
        this.reportsReader = mapper.readerFor(Reports.class).without(DeserializationFeature.FAIL_ON_UNKNOWN_PROPERTIES);
    }

    public FitData toData(FitResult r) {
        FactorModel m = r.model();
        try {
            String reports = mapper.writeValueAsString(reports(r));
            return new FitData(m.tickers(), r.dates(), m.factors(), m.exposures(), m.factorCovariance(), m.specificVariances(),
                    r.eigenvalues(), r.varianceShare(), r.means(), r.factorReturns(), reports, r.variances(), r.shortHistory());
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("cannot write fit reports as JSON: " + e.getOriginalMessage(), e);
        }
    }

    public FitResult toResult(FitData d) {
        Reports rep;
        try {
            rep = reportsReader.readValue(d.reportsJson());
        } catch (JsonProcessingException e) {
            throw new StoreException("stored fit reports cannot be read: " + e.getOriginalMessage(), e);
        }
        FactorModel m = new FactorModel(d.universe(), d.factors(), d.exposures(), d.factorCovariance(), d.specificVariances());
        // a fit stored before the variances were kept: the model's diagonal, equal to S_ii wherever the floor is inactive
        double[] variances = d.variances() != null ? d.variances() : m.diagonal();
        return new FitResult(m, d.dates(), d.eigenvalues(), d.varianceShare(), d.means(), d.factorReturns(), rep.excluded(),
                rep.factorCount(), rep.imputation(), rep.alignment(), rep.effectiveObservations(), rep.computeNanos(), rep.rank(),
                rep.totalVariance(), rep.basis(), variances, d.shortHistory());
    }

    public static Reports reports(FitResult r) {
        return new Reports(r.excluded(), r.factorCount(), r.imputation(), r.alignment(), r.effectiveObservations(), r.computeNanos(),
                r.rank(), r.totalVariance(), r.basis());
    }
}
