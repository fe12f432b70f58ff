package eigencov.service;

import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.math.ReturnPanel;
import eigencov.store.FitRepository;
import eigencov.store.JobRow;
import eigencov.store.ModelRow;
import eigencov.store.PanelStore;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;

/**
 * Range backfills as jobs (docs/design.md section 6): one fit of the model per planned trading date,
 * oldest first. A date that already has an ok fit of the job's spec version is skipped and listed;
 * a date whose fit fails is recorded (failed attempt with its reason) and the job goes on. The panel
 * is read once per run and each window cut from it, as {@link FitService#backfill} does.
 *
 * <p>Resuming: the fits and failed attempts a run stored carry the job's id, so a later run lists
 * them as its own and goes on with the first date that has neither.
 */
public final class BackfillJob implements JobKind {
    public static final String KIND = "backfill";

    /** The request as stored (and shown): the model and what the client asked. */
    public record Request(String model, LocalDate from, LocalDate to, String every) {
    }

    /** A fit the job made. */
    public record Made(LocalDate asOf, long id) {
    }

    /** A date whose fit failed, with the failed attempt and its reason. */
    public record Failed(LocalDate asOf, long fitId, String reason) {
    }

    /** The plan and what has been done of it. */
    public record Result(int specVersion, List<LocalDate> dates, List<Made> fits, List<LocalDate> skipped, List<Failed> failed) {
        public Result {
            dates = List.copyOf(dates);
            fits = List.copyOf(fits);
            skipped = List.copyOf(skipped);
            failed = List.copyOf(failed);
        }
    }

    private final JobFits jobFits;
    private final FitRepository fits;
    private final PanelStore panels;
    private final ObjectMapper mapper;

    BackfillJob(JobFits jobFits, FitRepository fits, PanelStore panels, ObjectMapper mapper) {
        this.jobFits = jobFits;
        this.fits = fits;
        this.panels = panels;
        this.mapper = mapper;
    }

    @Override
    public String name() {
        return KIND;
    }

    @Override
    public String run(JobRow job, JobContext ctx) {
        Request req = JobJson.read(mapper, job.requestJson(), Request.class);
        Result plan = JobJson.read(mapper, job.resultJson(), Result.class);
        ModelRow m = jobFits.current(req.model(), plan.specVersion());
        ModelSpec spec = ModelService.readSpec(mapper, m);
        Map<LocalDate, List<FitRepository.Mark>> marks = fits.attemptsAt(m.id(), plan.dates());
        List<Made> made = new ArrayList<>();
        List<LocalDate> skipped = new ArrayList<>();
        List<Failed> failed = new ArrayList<>();
        ReturnPanel all = null;
        List<LocalDate> dates = plan.dates();
        for (int i = 0; i < dates.size(); i++) {
            LocalDate d = dates.get(i);
            Optional<JobFits.Result> known = JobFits.classify(marks.get(d), plan.specVersion(), job.id());
            JobFits.Result r;
            if (known.isPresent()) {
                r = known.get();
            } else {
                ctx.checkRunning();
                if (all == null) all = panels.loadWindow(spec.panel(), dates.get(dates.size() - 1), Integer.MAX_VALUE);
                r = jobFits.ensure(req.model(), plan.specVersion(), d, all, job.id(), FitService.BACKFILL);
            }
            switch (r.outcome()) {
                case FOUND, MADE -> {
                    if (r.byThisJob()) made.add(new Made(d, r.fitId()));
                    else skipped.add(d);
                }
                case FAILED -> failed.add(new Failed(d, r.fitId(), r.reason()));
            }
            // resumed runs pass quickly over the dates an earlier run finished; store progress from where it was
            if (i + 1 > ctx.doneAtStart() || i + 1 == dates.size()) {
                ctx.progress(i + 1, JobJson.write(mapper, new Result(plan.specVersion(), dates, made, skipped, failed)));
            }
        }
        return JobJson.write(mapper, new Result(plan.specVersion(), dates, made, skipped, failed));
    }

    @Override
    public Map<String, String> links(JobRow job) {
        String model = JobJson.read(mapper, job.requestJson(), Request.class).model();
        Map<String, String> out = new LinkedHashMap<>();
        out.put("model", "/v1/models/" + model);
        out.put("fits", "/v1/models/" + model + "/fits");
        return out;
    }

    @Override
    public Map<String, Object> details(JobRow job) {
        Result r = JobJson.read(mapper, job.resultJson(), Result.class);
        Map<String, Object> out = new LinkedHashMap<>();
        out.put("model", JobJson.read(mapper, job.requestJson(), Request.class).model());
        out.put("specVersion", r.specVersion());
        out.put("fits", r.fits());
        out.put("skipped", r.skipped());
        out.put("failed", r.failed());
        return out;
    }


}
