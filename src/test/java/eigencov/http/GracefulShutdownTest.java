package eigencov.http;

import io.javalin.Javalin;
import org.junit.jupiter.api.Test;

import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.util.List;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class GracefulShutdownTest {

    @Test
    void stop_lets_a_request_in_flight_finish() throws Exception {
        CountDownLatch entered = new CountDownLatch(1);
        CountDownLatch release = new CountDownLatch(1);
        RouteModule slow = routes -> routes.get("/slow", ctx -> {
            entered.countDown();
            if (!release.await(30, TimeUnit.SECONDS)) throw new IllegalStateException("never released");
            ctx.result("finished");
        });
        Javalin http = HttpApi.create("127.0.0.1", 0, 1 << 20, 20_000, HttpApi.objectMapper(), () -> true, ApiKeys.none(), List.of(slow));
        http.start();
        HttpClient client = HttpClient.newHttpClient();
        CompletableFuture<HttpResponse<String>> inFlight = client.sendAsync(
                HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + http.port() + "/slow")).build(), HttpResponse.BodyHandlers.ofString());
        assertTrue(entered.await(30, TimeUnit.SECONDS), "request reached the handler");

        Thread stopper = new Thread(http::stop, "stopper");
        stopper.start();
        // Wait until the stop either returned (not graceful: it did not wait for us) or blocks in Jetty's
        // wait for graceful components, which is the state we want while the request is still running.
        while (stopper.isAlive() && !waitingForGracefulStop(stopper)) Thread.onSpinWait();
        assertTrue(stopper.isAlive(), "stop returned while a request was still in flight");
        release.countDown();

        HttpResponse<String> res = inFlight.get(30, TimeUnit.SECONDS);
        assertEquals(200, res.statusCode());
        assertEquals("finished", res.body());
        stopper.join(30_000);
        assertTrue(http.jettyServer().server().isStopped());
    }

    private static boolean waitingForGracefulStop(Thread t) {
        boolean inDoStop = false;
        boolean waiting = false;
        for (StackTraceElement e : t.getStackTrace()) {
            if (e.getClassName().equals("org.eclipse.jetty.server.Server") && e.getMethodName().equals("doStop")) inDoStop = true;
            if (e.getClassName().equals("java.util.concurrent.CompletableFuture") && e.getMethodName().contains("Get")) waiting = true;
        }
        return inDoStop && waiting;
    }
}
