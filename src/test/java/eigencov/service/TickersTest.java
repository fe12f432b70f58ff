package eigencov.service;

import org.junit.jupiter.api.Test;

import java.util.Random;

import static org.junit.jupiter.api.Assertions.assertEquals;

class TickersTest {
    private static final String ALPHABET = "AZaz09._:/- ,;\"'\u00e9\u0000+*";

    @Test
    void loop_check_agrees_with_the_design_regex_on_seeded_random_strings() {
        Random rnd = new Random(5L);
        for (int i = 0; i < 20_000; i++) {
            int len = rnd.nextInt(35);
            StringBuilder sb = new StringBuilder(len);
            for (int c = 0; c < len; c++) sb.append(ALPHABET.charAt(rnd.nextInt(ALPHABET.length())));
            String s = sb.toString();
            assertEquals(Tickers.SYNTAX.matcher(s).matches(), Tickers.wellFormed(s), "'" + s + "'");
        }
    }
}
