package eigencov;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Set;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * A newcomer who has only this repository can follow every document reference in it: each one
 * names a file of the repository (or a published source, which is not a path) and, for the
 * project's own pages, a section they have.
 */
class DocumentReferencesTest {

    @Test
    void every_document_named_in_the_repository_is_one_of_its_files() throws IOException {
        Path root = Path.of("").toAbsolutePath();
        assertTrue(Files.isRegularFile(root.resolve("pom.xml")), "tests run from the project folder, not " + root);
        List<String> problems = DocumentReferences.problems(root);
        assertEquals(List.of(), problems, "references that do not resolve:\n" + String.join("\n", problems));
    }

    @Test
    void the_pages_cited_by_number_exist_with_their_numbering() throws IOException {
        Path docs = Path.of("docs");
        String md = ".md";
        // sections 1-6 of the design page, 0-11 of the methods page, practices 1-16 of the code-style page
        assertEquals(Set.of("1", "2", "3", "4", "5", "6"),
                DocumentReferences.numbers(Files.readString(docs.resolve("design" + md))));
        assertEquals(Set.of("0", "1", "2", "3", "4", "5", "6", "7", "8", "9", "10", "11"),
                DocumentReferences.numbers(Files.readString(docs.resolve("methods" + md))));
        assertTrue(DocumentReferences.numbers(Files.readString(docs.resolve("code-style" + md)))
                .containsAll(List.of("1", "2", "3", "4", "5", "6", "7", "8", "9", "10", "11", "12", "13", "14", "15", "16")));
    }

    @Test
    void planted_bad_references_are_each_reported(@TempDir Path repo) throws IOException {
        String md = ".md";
        Files.createDirectories(repo.resolve("docs"));
        Files.createDirectories(repo.resolve("src/eigencov"));
        Files.writeString(repo.resolve("docs/design" + md), "# design\n## 1. Users\n## 3. Numbers\n### 3.9 Signs\n");
        Files.writeString(repo.resolve("docs/code-style" + md), "# style\n1. **Layers.** x\n8. **Arrays.** y\n");
        Files.writeString(repo.resolve("README" + md), String.join("\n",
                "See [the design](docs/design" + md + ") and [nothing](docs/missing" + md + ").",
                "Fine: docs/design" + md + " section 3.9, https://example.org/elsewhere" + md + ".",
                "Linked: [docs/design" + md + "](docs/design" + md + ") section 9.",
                ""));
        Files.writeString(repo.resolve("src/eigencov/Kernel.java"), String.join("\n",
                "/** Flat arrays (docs/code-style" + md + " practice 8), signs (docs/design" + md + " section 3.9). */",
                "/** Bare: design" + md + " section 3; outside: /work/" + "shared/methods" + md + ". */",
                "/** Unknown: docs/design" + md + " section 7, docs/code-style" + md + " practice 12c, notes" + md + ". */",
                "/** Old name: style" + md + " practice 8; relative: ../" + "shared/design" + md + ". */",
                ""));

        List<String> problems = DocumentReferences.problems(repo);

        assertEquals(List.of(
                "README" + md + ":1: link target 'docs/missing" + md + "' is not a file of the repository",
                "README" + md + ":3: docs/design" + md + " has no section 9",
                "src/eigencov/Kernel.java:2: names '/work/" + "shared', a folder outside the repository; cite docs/ or a published source",
                "src/eigencov/Kernel.java:4: names '../" + "shared', a folder outside the repository; cite docs/ or a published source",
                "src/eigencov/Kernel.java:2: 'design" + md + "' without its folder; write docs/design" + md,
                "src/eigencov/Kernel.java:2: '/work/" + "shared/methods" + md + "' is not a file of the repository",
                "src/eigencov/Kernel.java:3: docs/design" + md + " has no section 7",
                "src/eigencov/Kernel.java:3: docs/code-style" + md + " has no practice 12",
                "src/eigencov/Kernel.java:3: 'notes" + md + "' is not a file of the repository",
                "src/eigencov/Kernel.java:4: 'style" + md + "' is not a file of the repository",
                "src/eigencov/Kernel.java:4: '../" + "shared/design" + md + "' is not a file of the repository"),
                problems);
    }
}
