package eigencov.service;

import eigencov.store.FitRepository;
import eigencov.store.FitRow;
import eigencov.store.ModelRepository;

import java.time.LocalDate;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicReference;

/**
 * The fits queries are answered from. Each model's newest fit (latest asOf, then highest id) is an
 * immutable {@link ServedFit} behind one {@link AtomicReference}, swapped in only after the fit is
 * committed ({@link #publish}); readers never lock and never wait for a running refit. Older fits
 * are loaded from the store on demand and kept in a small LRU cache. {@link #refresh()} picks up
 * fits that other instances wrote to the shared store.
 */
public final class ServedFits implements FitLookup {
    /** Older fits kept in memory; a 3,000 x 20 fit with 504 days of factor returns is about 1 MB. */
    static final int CACHE_SIZE = 16;

    private final FitRepository fits;
    private final ModelRepository models;
    private final FitCodec codec;
    private final ConcurrentHashMap<String, AtomicReference<ServedFit>> newest = new ConcurrentHashMap<>();
    private final Map<Long, ServedFit> older = new LinkedHashMap<>(CACHE_SIZE * 2, 0.75f, true) {
        @Override
        protected boolean removeEldestEntry(Map.Entry<Long, ServedFit> eldest) {
            return size() > CACHE_SIZE;
        }
    };

    public ServedFits(FitRepository fits, ModelRepository models, FitCodec codec) {
        this.fits = fits;
        this.models = models;
        this.codec = codec;
    }

    @Override
    public ServedFit resolve(String model, LocalDate asOf, Long fitId) {
        if (fitId != null) {
            ServedFit cur = held(model);
            if (cur != null && cur.ref().id() == fitId) return cur;
            ServedFit f = byId(fitId);
            if (f == null || !f.ref().model().equals(model)) {
                requireModel(model);
                throw new NotFoundException("fit", fitId + " of model " + model);
            }
            return f;
        }
        ServedFit cur = newest(model).orElseThrow(() -> {
            requireModel(model);
            return new NotFoundException("fit", "any fit of model " + model);
        });
        if (asOf == null || !cur.ref().asOf().isAfter(asOf)) return cur;
        FitRow row = fits.latestAsOf(model, asOf).orElseThrow(() -> new NotFoundException("fit", model + " as of " + asOf));
        return byId(row.id());
    }

    /** The model's newest fit: the served snapshot, or loaded from the store (and published) on first use. */
    public Optional<ServedFit> newest(String model) {
        ServedFit cur = held(model);
        if (cur != null) return Optional.of(cur);
        Optional<FitRow> row = fits.newest(model);
        if (row.isEmpty()) return Optional.empty();
        ServedFit loaded = load(row.get());
        return Optional.of(accumulate(loaded));
    }

    /**
     * Makes {@code fit} the served fit of its model if it is newer (later asOf, or same asOf and higher
     * id) than the one served; atomically, so concurrent publishers keep the newest.
     *
     * @return the fit served afterwards
     */
    public ServedFit publish(ServedFit fit) {
        String model = fit.ref().model();
        if (held(model) == null) {
            // Nothing served here yet (first use since start): the store's newest fit comes first, so a
            // backfilled fit of an earlier date never takes the place of a later one until the next refresh.
            fits.newest(model).filter(r -> r.id() != fit.ref().id()).ifPresent(r -> accumulate(load(r)));
        }
        return accumulate(fit);
    }

    private ServedFit accumulate(ServedFit fit) {
        AtomicReference<ServedFit> ref = newest.computeIfAbsent(fit.ref().model(), k -> new AtomicReference<>());
        return ref.accumulateAndGet(fit, (cur, next) -> cur == null || isNewer(next.ref(), cur.ref()) ? next : cur);
    }

    /** Stops serving the model (deleted). */
    public void forget(String model) {
        newest.remove(model);
        synchronized (older) {
            older.values().removeIf(f -> f.ref().model().equals(model));
        }
    }

    /**
     * Picks up fits written by other instances sharing the store: for each model served here whose
     * newest fit in the store differs, loads and publishes it; models gone from the store are dropped.
     */
    public void refresh() {
        Map<String, Long> ids = fits.newestIds();
        for (String model : newest.keySet()) {
            Long id = ids.get(model);
            ServedFit cur = held(model);
            if (id == null) {
                if (models.find(model).isEmpty()) forget(model);
            } else if (cur == null || cur.ref().id() != id) {
                fits.find(id).filter(FitRow::ok).ifPresent(r -> accumulate(load(r)));
            }
        }
    }

    /** Previous fit to align a new fit as of {@code asOf} to: the latest fit with asOf on or before it, or null. */
    public ServedFit previousFor(String model, LocalDate asOf) {
        try {
            return resolve(model, asOf, null);
        } catch (NotFoundException e) {
            return null;
        }
    }

    private ServedFit held(String model) {
        AtomicReference<ServedFit> ref = newest.get(model);
        return ref == null ? null : ref.get();
    }

    private ServedFit byId(long id) {
        synchronized (older) {
            ServedFit f = older.get(id);
            if (f != null) return f;
        }
        Optional<FitRow> row = fits.find(id).filter(FitRow::ok);
        if (row.isEmpty()) return null;
        ServedFit f = load(row.get());
        synchronized (older) {
            older.put(id, f);
        }
        return f;
    }

    private ServedFit load(FitRow row) {
        var data = fits.data(row.id()).orElseThrow(() -> new IllegalStateException("fit " + row.id() + " has no stored data"));
        return new ServedFit(new FitRef(row.id(), row.model(), row.asOf(), row.createdAt()), codec.toResult(data));
    }

    private void requireModel(String model) {
        if (models.find(model).isEmpty()) throw new NotFoundException("model", model);
    }

    static boolean isNewer(FitRef a, FitRef b) {
        int c = a.asOf().compareTo(b.asOf());
        return c > 0 || (c == 0 && a.id() > b.id());
    }
}
