package eigencov.app;

import java.util.Arrays;
import java.util.List;
import java.util.Map;

/**
 * Command line: {@code java -jar eigencov.jar serve [--port N] [--db JDBC_URL] [--demo] ...}.
 * See {@link AppConfig#fromArgs} for every flag and environment variable.
 */
public final class Main {
    private Main() {
    }

    public static void main(String[] args) {
        if (args.length == 0 || !args[0].equals("serve")) {
            System.err.println("usage: java -jar eigencov.jar serve [--port N] [--host H] [--db JDBC_URL] [--demo] [--demo-dir DIR]");
            System.err.println("       every flag also reads from EIGENCOV_<FLAG> (e.g. EIGENCOV_PORT, EIGENCOV_DB_URL, EIGENCOV_API_KEYS)");
            System.exit(args.length == 0 ? 2 : (args[0].equals("--help") || args[0].equals("help") ? 0 : 2));
        }
        AppConfig config;
        try {
            config = AppConfig.fromArgs(List.of(Arrays.copyOfRange(args, 1, args.length)), System.getenv());
        } catch (AppConfig.ConfigException e) {
            System.err.println("eigencov: configuration error: " + e.getMessage());
            System.exit(2);
            return;
        }
        StringBuilder sb = new StringBuilder("eigencov configuration:");
        for (Map.Entry<String, String> e : config.describe().entrySet()) sb.append("\n  ").append(e.getKey()).append(" = ").append(e.getValue());
        System.err.println(sb);
        App app;
        try {
            app = App.create(config).start();
        } catch (RuntimeException e) {
            System.err.println("eigencov: cannot start: " + e.getMessage());
            System.exit(1);
            return;
        }
        Runtime.getRuntime().addShutdownHook(new Thread(app::close, "eigencov-shutdown"));
    }
}
