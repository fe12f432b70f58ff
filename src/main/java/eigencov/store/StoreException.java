package eigencov.store;

/** The store could not do what was asked (unreachable, constraint broken, migration failed). */
public class StoreException extends RuntimeException {
    public StoreException(String message, Throwable cause) {
        super(message, cause);
    }
}
