package eigencov.store;

import java.io.IOException;
import java.time.LocalDate;

/** Receives returns read back from a panel, one row at a time, in (date, ticker) order. */
@FunctionalInterface
public interface ReturnSink {
    void accept(LocalDate date, String ticker, double value) throws IOException;
}
