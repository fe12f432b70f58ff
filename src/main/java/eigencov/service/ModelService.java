package eigencov.service;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.store.FitRepository;
import eigencov.store.ModelRepository;
import eigencov.store.ModelRow;
import eigencov.store.PanelStore;

import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.temporal.ChronoUnit;
import java.util.List;

/**
 * Model specs: create, replace (each replace is a new spec version; fits record the version they
 * used), read, list, delete. A spec naming a panel that does not exist is rejected with 422 on field
 * {@code panel} (the request is well-formed; what it refers to is missing); every other invalid value
 * with 400 naming its field.
 */
public final class ModelService {
    private final ModelRepository models;
    private final FitRepository fits;
    private final PanelStore panels;
    private final ServedFits served;
    private final ObjectMapper mapper;
    private final Clock clock;

    public ModelService(ModelRepository models, FitRepository fits, PanelStore panels, ServedFits served, ObjectMapper mapper, Clock clock) {
        this.models = models;
        this.fits = fits;
        this.panels = panels;
        this.served = served;
        this.mapper = mapper;
        this.clock = clock;
    }

    /** The stored model and whether it was created (false: replaced). */
    public record PutResult(ModelView model, boolean created) {
    }

    public PutResult put(String name, ModelSpec spec) {
        requireName(name);
        if (spec == null) throw InvalidInputException.field("body", "a model spec is required");
        List<InvalidInputException.Issue> problems = spec.problems();
        if (!problems.isEmpty()) throw new InvalidInputException("invalid model spec: " + problems.size() + " problem(s)", problems);
        if (panels.panel(spec.panel()).isEmpty()) {
            throw new InvalidInputException("panel '" + spec.panel() + "' does not exist",
                    List.of(new InvalidInputException.Issue(null, "panel", "no panel named '" + spec.panel() + "'; ingest returns first")),
                    true, "unknown-panel");
        }
        ModelSpec stored = spec.withDefaults();
        Duration every = stored.refitPeriod();
        String json;
        try {
            json = mapper.writeValueAsString(stored);
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("cannot write spec as JSON: " + e.getOriginalMessage(), e);
        }
        ModelRow row = models.put(name, new ModelRepository.SpecData(stored.panel(), json, every == null ? null : every.getSeconds(),
                stored.refitOnIngest()), now(clock));
        return new PutResult(view(row), row.version() == 1);
    }

    public ModelView get(String name) {
        return view(models.find(name).orElseThrow(() -> new NotFoundException("model", name)));
    }

    public List<ModelView> list() {
        return models.list().stream().map(this::view).toList();
    }

    /** Deletes the model, its spec history and its fits, and stops serving it. */
    public void delete(String name) {
        if (!models.delete(name)) throw new NotFoundException("model", name);
        served.forget(name);
    }

    /** The spec of a stored model. */
    static ModelSpec readSpec(ObjectMapper mapper, ModelRow row) {
        try {
            return mapper.readValue(row.specJson(), ModelSpec.class);
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("stored spec of model " + row.name() + " cannot be read: " + e.getOriginalMessage(), e);
        }
    }

    private ModelView view(ModelRow row) {
        ModelView.LatestFit latest = fits.newest(row.name()).map(f -> new ModelView.LatestFit(f.id(), f.asOf(), f.createdAt())).orElse(null);
        return new ModelView(row.name(), readSpec(mapper, row), row.version(), row.createdAt(), row.updatedAt(), latest);
    }

    static void requireName(String name) {
        if (name == null || !ModelSpec.NAME.matcher(name).matches()) {
            throw InvalidInputException.field("model", "model names match [A-Za-z0-9._-]{1,64}, was '" + name + "'");
        }
    }

    static Instant now(Clock clock) {
        return clock.instant().truncatedTo(ChronoUnit.MILLIS);
    }
}
