package eigencov;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.PathMatcher;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;

/**
 * Finds references to documents that a reader of the repository cannot follow: a markdown document
 * named anywhere in the text files (comments, tests, scripts, guides, the OpenAPI file, pom.xml)
 * that is not a file of the repository, a relative markdown link whose target is missing, a bare
 * name of one of the pages under {@code docs/} (it must be written with its {@code docs/} path, so
 * it reads the same from every file), a section or practice number that the cited page does not
 * have, and any mention of the team's folder outside the repository.
 *
 * <p>How a mention resolves: a path with a slash, relative to the mentioning file's folder or to
 * the repository root; a bare file name, when some file of the repository has that name (such as
 * each reference dataset's SOURCE.md); a glob ({@code *}), when it matches a file. Web addresses
 * are not checked.
 */
final class DocumentReferences {

    /** Folders never scanned: version control, build output, IDE files, a local run's store and benchmark output. */
    private static final Set<String> SKIPPED_DIRECTORIES = Set.of(".git", "target", ".idea", "node_modules");
    private static final Set<String> SKIPPED_ROOT_DIRECTORIES = Set.of("data", "bench-out");
    /** Binary or compressed files: they hold no prose. */
    private static final List<String> BINARY_SUFFIXES = List.of(".gz", ".npy", ".npz", ".jar", ".class", ".zip", ".png",
            ".jpg", ".ico", ".db");
    /** Built from parts so that this file does not name the folders it forbids. */
    private static final List<String> OUTSIDE_PATHS = List.of("/work/" + "shared", ".." + "/shared");

    private static final Pattern LINK = Pattern.compile("\\]\\(([^)\\s]+)(\\s+\"[^\"]*\")?\\)");
    private static final Pattern URL = Pattern.compile("[A-Za-z][A-Za-z0-9+.-]*://\\S+");
    private static final Pattern MENTION = Pattern.compile("(?<![A-Za-z0-9_./*-])([A-Za-z0-9_./*-]*[A-Za-z0-9_-]\\.md)(?![A-Za-z0-9_])");
    /**
     * "section 3", "sections 10 and 11", "section 3.9", "practice 12c" right after a page's name (or after the
     * markdown link whose text it is; link targets are blanked by then).
     */
    private static final Pattern SECTION_AFTER = Pattern.compile(
            "^(?:\\]\\(\\s*\\))?'?s?[\\s,(]{0,3}(sections?|practices?)\\s+(\\d+(?:\\.\\d+)?)[a-z]?(?:\\s*(?:-|and|to)\\s*(\\d+(?:\\.\\d+)?))?");

    private DocumentReferences() {
    }

    /** One problem per line, {@code path:line: what}; empty when every reference resolves. */
    static List<String> problems(Path root) throws IOException {
        Path base = root.toAbsolutePath().normalize();
        List<Path> files = textFiles(base);
        Map<String, List<Path>> byName = new HashMap<>();
        for (Path f : files) {
            byName.computeIfAbsent(f.getFileName().toString(), n -> new ArrayList<>()).add(f);
        }
        Map<String, Set<String>> sections = new HashMap<>();
        for (String page : List.of("design", "methods", "code-style")) {
            Path p = base.resolve("docs").resolve(page + ".md");
            if (Files.isRegularFile(p)) {
                sections.put("docs/" + page + ".md", numbers(Files.readString(p, StandardCharsets.UTF_8)));
            }
        }
        List<String> out = new ArrayList<>();
        for (Path file : files) {
            byte[] bytes = Files.readAllBytes(file);
            if (isBinary(bytes)) {
                continue;
            }
            String text = new String(bytes, StandardCharsets.UTF_8);
            String where = base.relativize(file).toString().replace('\\', '/');
            for (String outside : OUTSIDE_PATHS) {
                for (int i = text.indexOf(outside); i >= 0; i = text.indexOf(outside, i + 1)) {
                    out.add(where + ":" + line(text, i) + ": names '" + outside
                            + "', a folder outside the repository; cite docs/ or a published source");
                }
            }
            StringBuilder prose = new StringBuilder(text);
            if (where.endsWith(".md")) {
                Matcher m = LINK.matcher(text);
                while (m.find()) {
                    String target = m.group(1);
                    blank(prose, m.start(1), m.end(1));
                    if (target.startsWith("#") || target.matches("[A-Za-z][A-Za-z0-9+.-]*:.*")) {
                        continue;
                    }
                    String path = target.replaceFirst("#.*$", "");
                    if (!inside(base, file.getParent().resolve(path))) {
                        out.add(where + ":" + line(text, m.start(1)) + ": link target '" + target
                                + "' is not a file of the repository");
                    }
                }
            }
            Matcher u = URL.matcher(prose);
            while (u.find()) {
                blank(prose, u.start(), u.end());
            }
            Matcher m = MENTION.matcher(prose);
            while (m.find()) {
                String ref = m.group(1);
                String at = where + ":" + line(text, m.start(1)) + ": ";
                if (ref.contains("*")) {
                    PathMatcher glob = base.getFileSystem().getPathMatcher("glob:" + ref);
                    if (files.stream().noneMatch(f -> glob.matches(base.relativize(f)))) {
                        out.add(at + "'" + ref + "' matches no file of the repository");
                    }
                    continue;
                }
                if (!ref.contains("/")) {
                    if (Files.isRegularFile(base.resolve("docs").resolve(ref))) {
                        out.add(at + "'" + ref + "' without its folder; write docs/" + ref);
                    } else if (!byName.containsKey(ref)) {
                        out.add(at + "'" + ref + "' is not a file of the repository");
                    }
                    continue;
                }
                if (!inside(base, file.getParent().resolve(ref)) && !inside(base, base.resolve(ref))) {
                    out.add(at + "'" + ref + "' is not a file of the repository");
                    continue;
                }
                String page = base.relativize(base.resolve(ref).normalize()).toString().replace('\\', '/');
                Set<String> known = sections.get(page);
                if (known == null) {
                    continue;
                }
                Matcher s = SECTION_AFTER.matcher(prose.subSequence(m.end(1), Math.min(prose.length(), m.end(1) + 60)));
                if (s.find()) {
                    for (int g = 2; g <= 3; g++) {
                        String number = s.group(g);
                        if (number != null && !known.contains(number)) {
                            out.add(at + page + " has no " + (s.group(1).startsWith("practice") ? "practice " : "section ")
                                    + number);
                        }
                    }
                }
            }
        }
        return out;
    }

    /**
     * Section numbers of a page: headings "## 3. ..." and "### 3.9 ..." (design, methods) and the
     * numbered practices "12. **...**" (code style).
     */
    static Set<String> numbers(String page) {
        Set<String> out = new java.util.HashSet<>();
        Matcher h = Pattern.compile("(?m)^#{2,4} (\\d+(?:\\.\\d+)?)\\.? ").matcher(page);
        while (h.find()) {
            out.add(h.group(1));
        }
        Matcher p = Pattern.compile("(?m)^(\\d+)\\. \\*\\*").matcher(page);
        while (p.find()) {
            out.add(p.group(1));
        }
        return out;
    }

    private static List<Path> textFiles(Path base) throws IOException {
        List<Path> out = new ArrayList<>();
        try (Stream<Path> walk = Files.walk(base)) {
            walk.filter(p -> !skipped(base, p))
                    .filter(Files::isRegularFile)
                    .filter(p -> BINARY_SUFFIXES.stream().noneMatch(s -> p.getFileName().toString().endsWith(s)))
                    .sorted()
                    .forEach(out::add);
        }
        return out;
    }

    private static boolean skipped(Path base, Path p) {
        Path rel = base.relativize(p);
        for (int i = 0; i < rel.getNameCount(); i++) {
            String part = rel.getName(i).toString();
            if (SKIPPED_DIRECTORIES.contains(part) || i == 0 && rel.getNameCount() > 1 && SKIPPED_ROOT_DIRECTORIES.contains(part)) {
                return true;
            }
        }
        return false;
    }

    private static boolean inside(Path base, Path target) {
        Path t = target.toAbsolutePath().normalize();
        return t.startsWith(base) && Files.exists(t);
    }

    private static boolean isBinary(byte[] bytes) {
        for (int i = 0; i < Math.min(bytes.length, 8192); i++) {
            if (bytes[i] == 0) {
                return true;
            }
        }
        return false;
    }

    private static void blank(StringBuilder s, int from, int to) {
        for (int i = from; i < to; i++) {
            if (s.charAt(i) != '\n') {
                s.setCharAt(i, ' ');
            }
        }
    }

    private static int line(String text, int index) {
        int n = 1;
        for (int i = 0; i < index; i++) {
            if (text.charAt(i) == '\n') {
                n++;
            }
        }
        return n;
    }
}
