# Build: docker build -t eigencov .
# Run:   docker run -p 8080:8080 -v eigencov-data:/data -e EIGENCOV_API_KEYS='write:<key>' eigencov [--demo]

FROM maven:3.9-eclipse-temurin-17 AS build
WORKDIR /src
COPY pom.xml .
RUN mvn -B -q dependency:go-offline
COPY src src
# The API contract is packaged into the jar (served at /openapi.yaml).
COPY openapi openapi
RUN mvn -B -q package -DskipTests

FROM eclipse-temurin:17-jre
RUN groupadd --system eigencov \
 && useradd --system --gid eigencov --home-dir /app --shell /usr/sbin/nologin eigencov \
 && mkdir -p /data \
 && chown eigencov:eigencov /data
WORKDIR /app
COPY --from=build /src/target/eigencov.jar /app/eigencov.jar
COPY demo-data /app/demo-data
# The store lives in the volume. No EIGENCOV_HOST here: without API keys the server binds to
# loopback only (unreachable from outside the container), with keys to all interfaces.
ENV EIGENCOV_DB_URL=jdbc:h2:file:/data/eigencov \
    EIGENCOV_PORT=8080 \
    EIGENCOV_DEMO_DIR=/app/demo-data
VOLUME /data
EXPOSE 8080
USER eigencov
# bash's /dev/tcp: no curl or wget needed in the runtime image.
HEALTHCHECK --interval=30s --timeout=5s --start-period=120s --retries=3 \
  CMD ["bash", "-c", "exec 3<>/dev/tcp/127.0.0.1/8080 && printf 'GET /health HTTP/1.0\\r\\n\\r\\n' >&3 && head -1 <&3 | grep -q ' 200 '"]
# The fit's vector kernels need the JDK module jdk.incubator.vector; a runtime without it still
# serves, with the scalar kernels, instead of failing to start.
ENTRYPOINT ["sh", "-c", "v=; java --add-modules jdk.incubator.vector -version >/dev/null 2>&1 && v='--add-modules jdk.incubator.vector'; exec java -XX:MaxRAMPercentage=75 $v -jar /app/eigencov.jar serve \"$@\"", "eigencov"]
