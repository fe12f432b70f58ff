package eigencov.service;

import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.store.FitRepository;
import eigencov.store.ModelRepository;
import eigencov.store.PanelStore;
import eigencov.store.RefitLocks;

import java.util.List;
import java.util.concurrent.ExecutorService;

/** The job kinds of this version, wired for {@link JobRunner}: {@code backfill} and {@code evaluation}. */
public final class JobKinds {
    private JobKinds() {
    }

    /**
     * @param modelClaims the models' cluster-wide claims, the same instance the refit scheduler uses
     * @param kernels     the fitter's pool, which evaluations' baselines also split their products over
     */
    public static List<JobKind> create(FitService fitService, FitRepository fits, ModelRepository models, PanelStore panels,
                                       RefitLocks modelClaims, ObjectMapper mapper, ExecutorService kernels) {
        JobFits jobFits = new JobFits(fitService, fits, models, modelClaims);
        return List.of(new BackfillJob(jobFits, fits, panels, mapper), new EvaluationJob(jobFits, fitService, fits, panels, mapper, kernels));
    }
}
