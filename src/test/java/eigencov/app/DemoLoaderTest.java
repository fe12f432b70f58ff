package eigencov.app;

import eigencov.service.PanelService;
import eigencov.service.ReturnsFormat;
import eigencov.store.PanelStore;
import eigencov.store.PanelSummary;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.io.ByteArrayInputStream;
import java.net.URISyntaxException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.LocalDate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class DemoLoaderTest {

    private static Path fixture() throws URISyntaxException {
        return Path.of(DemoLoaderTest.class.getResource("/demo-mini/models.json").toURI()).getParent();
    }

    @Test
    void demo_start_loads_the_named_panel_from_the_gzip_csv() throws Exception {
        try (App app = App.create(AppConfig.forTest("demo1").withDemo(true, fixture()))) {
            PanelSummary s = new PanelStore(app.database()).panel("mini").orElseThrow();
            assertEquals(new PanelSummary("mini", 2, 3, 5, LocalDate.of(2024, 6, 3), LocalDate.of(2024, 6, 5)), s);
        }
    }

    @Test
    void demo_leaves_a_panel_that_already_holds_rows_alone() throws Exception {
        try (App app = App.create(AppConfig.forTest("demo2"))) {
            PanelStore store = new PanelStore(app.database());
            PanelService panels = new PanelService(store, 10);
            panels.ingest("mini", ReturnsFormat.CSV,
                    new ByteArrayInputStream("date,ticker,value\n2024-01-02,OWN,0.5\n".getBytes(StandardCharsets.US_ASCII)));
            new DemoLoader(fixture(), panels, eigencov.http.HttpApi.objectMapper()).load();
            PanelSummary s = store.panel("mini").orElseThrow();
            assertEquals(1, s.rows());
            assertEquals(1, s.tickers());
        }
    }

    @Test
    void demo_without_its_folder_fails_at_start_naming_the_file(@TempDir Path empty) {
        var e = assertThrows(IllegalStateException.class, () -> App.create(AppConfig.forTest("demo3").withDemo(true, empty)));
        assertTrue(e.getMessage().contains("models.json"), e.getMessage());
    }
}
