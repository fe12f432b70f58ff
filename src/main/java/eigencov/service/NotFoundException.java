package eigencov.service;

/** A named panel, model, fit or other thing does not exist (HTTP 404). */
public class NotFoundException extends RuntimeException {
    private final String what;
    private final String name;

    public NotFoundException(String what, String name) {
        super(what + " '" + name + "' does not exist");
        this.what = what;
        this.name = name;
    }

    public String what() { return what; }
    public String name() { return name; }
}
