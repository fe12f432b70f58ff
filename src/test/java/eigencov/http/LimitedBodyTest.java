package eigencov.http;

import org.junit.jupiter.api.Test;

import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.InputStream;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

class LimitedBodyTest {
    @Test
    void reads_up_to_the_limit_then_drops_the_rest_of_the_body_before_refusing_it() throws IOException {
        ByteArrayInputStream raw = new ByteArrayInputStream(new byte[20_000]);
        LimitedBody body = new LimitedBody(raw, 4_096);
        byte[] buf = new byte[1_000];
        ApiException e = assertThrows(ApiException.class, () -> {
            while (body.read(buf, 0, buf.length) >= 0) {
                // read until refused
            }
        });
        assertEquals(413, e.status());
        // the client's remaining bytes were consumed, so it can read the answer instead of a reset
        assertEquals(0, raw.available());
        assertEquals(-1, raw.read());
    }

    @Test
    void a_body_far_over_the_limit_is_dropped_only_up_to_the_drain_bound() {
        CountingZeros raw = new CountingZeros();
        LimitedBody body = new LimitedBody(raw, 10);
        assertThrows(ApiException.class, () -> body.read(new byte[100], 0, 100));
        assertEquals(100 + LimitedBody.DRAIN_BYTES, raw.served);
    }

    @Test
    void a_body_within_the_limit_reads_whole() throws IOException {
        LimitedBody body = new LimitedBody(new ByteArrayInputStream(new byte[4_096]), 4_096);
        assertEquals(4_096, body.readAllBytes().length);
    }

    /** An endless stream of zeros that counts what it hands out. */
    private static final class CountingZeros extends InputStream {
        long served;

        @Override
        public int read() {
            served++;
            return 0;
        }

        @Override
        public int read(byte[] b, int off, int len) {
            served += len;
            return len;
        }
    }
}
