#!/usr/bin/env bash
# A guided tour of the eigencov API with curl, against a server started with the demo:
#
#   java --add-modules jdk.incubator.vector -jar target/eigencov.jar serve --demo        # then, in another terminal:
#   scripts/tour.sh                                   # or: EIGENCOV_URL=http://host:port scripts/tour.sh
#
# Each step prints the call, then the answer. Set EIGENCOV_KEY to send "Authorization: Bearer <key>".
# Set TOUR_PAUSE=1 to wait for Enter between steps. The demo market (panel "vellmoor") and its
# tickers are invented.
set -euo pipefail

URL="${EIGENCOV_URL:-http://127.0.0.1:8080}"
MODEL="${TOUR_MODEL:-vellmoor-1y-eq}"
PANEL="${TOUR_PANEL:-vellmoor}"
AUTH=()
if [[ -n "${EIGENCOV_KEY:-}" ]]; then AUTH=(-H "Authorization: Bearer ${EIGENCOV_KEY}"); fi
if command -v jq >/dev/null 2>&1; then PRETTY=(jq .); else PRETTY=(cat); fi

step() {
    echo
    echo "== $1"
    shift
    echo "\$ curl $*"
    # Show the status line of errors too; a query endpoint that is not deployed yet answers 404.
    local body status
    body=$(curl -sS "${AUTH[@]}" -w '\n%{http_code}' "$@") || { echo "(request failed: is the server running at $URL?)"; return 0; }
    status=${body##*$'\n'}
    body=${body%$'\n'*}
    echo "HTTP $status"
    # Long answers are cut to TOUR_LINES lines (|| true: the cut closes the pipe early).
    if [[ "$body" == \{* || "$body" == \[* ]]; then
        echo "$body" | "${PRETTY[@]}" | head -n "${TOUR_LINES:-40}" || true
    else
        echo "$body" | head -n "${TOUR_LINES:-40}" || true
    fi
    if [[ -n "${TOUR_PAUSE:-}" ]]; then read -r -p "(Enter for the next step) " _; fi
}

JSON=(-H 'Content-Type: application/json')

step "Is the server up, and is its store reachable?" "$URL/health"
step "Ready?" "$URL/ready"

step "Return panels: counts of tickers, dates and rows, and the date range" "$URL/v1/panels"
step "One panel" "$URL/v1/panels/$PANEL"
step "Read returns back (two tickers, one week), as CSV" -H 'Accept: text/csv' \
    "$URL/v1/panels/$PANEL/returns?tickers=BLDN.VLM,BNDX.VLM&from=2026-11-20&to=2026-11-27"
step "Upload returns (JSON; CSV with header date,ticker,value works too). Upserts on (date, ticker), all or nothing" \
    -X POST "${JSON[@]}" "$URL/v1/panels/tour-panel/returns" \
    -d '{"returns":[{"date":"2026-11-26","ticker":"QRLX.VLM","value":0.012},{"date":"2026-11-27","ticker":"QRLX.VLM","value":-0.004}]}'
step "A bad row is rejected with its row and field, and nothing is stored" \
    -X POST "${JSON[@]}" "$URL/v1/panels/tour-panel/returns" \
    -d '{"returns":[{"date":"2026-11-27","ticker":"QRLX.VLM","value":"lots"}]}'

step "Models: each spec with its newest fit" "$URL/v1/models"
step "One model" "$URL/v1/models/$MODEL"
step "Create a model of your own (201; PUT again to replace it: 200, version + 1)" \
    -X PUT "${JSON[@]}" "$URL/v1/models/tour-6m" \
    -d '{"panel":"'"$PANEL"'","windowDays":126,"factors":{"rule":"eigenvalue-ratio","max":20},"halfLifeDays":63,"minCoverage":0.9,"basis":"correlation"}'
step "An invalid spec names each bad field (problem+json)" \
    -X PUT "${JSON[@]}" "$URL/v1/models/tour-bad" \
    -d '{"panel":"'"$PANEL"'","windowDays":5,"factors":{"rule":"magic"},"minCoverage":1.5,"basis":"covariance"}'
step "Fit it now (201 with the fit summary)" -X POST "$URL/v1/models/tour-6m/fits"
step "Fit it as of a past date (backfill): reads no return dated after it" \
    -X POST "${JSON[@]}" "$URL/v1/models/tour-6m/fits" -d '{"asOf":"2026-06-30"}'
step "Fit history, newest first (failed attempts are listed with their reason)" "$URL/v1/models/$MODEL/fits"
FIT_ID=$(curl -sS "${AUTH[@]}" "$URL/v1/models/$MODEL/fits" | sed -n 's/^{"fits":\[{"id":\([0-9]*\).*/\1/p' || true)
step "One fit: universe, spectrum, factor-count evidence, imputation, alignment, timings" "$URL/v1/models/$MODEL/fits/${FIT_ID:-1}"

TICKERS='["BLDN.VLM","BMMN.VLM","BNDX.VLM","BNHS.VLM","BRND.VLM","BRNS.VLM","BRRX.VLM","BTHG.VLM","DEMI.VLM"]'
step "Covariance of a few names (annualised), from the newest fit" \
    -X POST "${JSON[@]}" "$URL/v1/models/$MODEL/covariance" -d '{"tickers":'"$TICKERS"',"scale":"annual"}'
step "The same as of a past date: the latest fit with asOf <= 2026-03-31" \
    -X POST "${JSON[@]}" "$URL/v1/models/$MODEL/covariance?asOf=2026-03-31" -d '{"tickers":'"$TICKERS"',"correlation":true}'
step "Covariance by GET, as CSV" -H 'Accept: text/csv' "$URL/v1/models/$MODEL/covariance?tickers=BLDN.VLM,BNDX.VLM,BRND.VLM&scale=annual"
step "Factor form: exposures, factor covariance, specific variances" \
    -X POST "${JSON[@]}" "$URL/v1/models/$MODEL/covariance" -d '{"tickers":["BLDN.VLM","BNDX.VLM","BRND.VLM"],"form":"factor"}'
step "Unknown tickers: 422 listing them, or missing=omit to leave them out" \
    -X POST "${JSON[@]}" "$URL/v1/models/$MODEL/covariance?missing=omit" -d '{"tickers":["BLDN.VLM","NOPE.VLM"]}'
step "Exposures and specific variance" -X POST "${JSON[@]}" "$URL/v1/models/$MODEL/exposures" -d '{"tickers":["BLDN.VLM","BNDX.VLM"]}'
step "Factors: factor covariance and variance shares" "$URL/v1/models/$MODEL/factors"
step "Factor returns over a month, as CSV" -H 'Accept: text/csv' "$URL/v1/models/$MODEL/factor-returns?from=2026-11-01&to=2026-11-27"
step "Risk of a portfolio: volatility, factor/specific split, by factor, by asset" \
    -X POST "${JSON[@]}" "$URL/v1/models/$MODEL/risk" \
    -d '{"weights":{"BLDN.VLM":0.3,"BNDX.VLM":0.3,"BRND.VLM":0.2,"DEMI.VLM":0.2},"scale":"annual"}'
step "Tracking error against a benchmark" \
    -X POST "${JSON[@]}" "$URL/v1/models/$MODEL/risk" \
    -d '{"weights":{"BLDN.VLM":0.4,"BNDX.VLM":0.3,"BRND.VLM":0.3},"benchmark":{"BLDN.VLM":0.25,"BNDX.VLM":0.25,"BRND.VLM":0.25,"DEMI.VLM":0.25},"scale":"annual"}'
step "A recent listing (NELE.VLM, listed 2026-09-02) answers as a short-history name, listed in \"shortHistory\"" \
    -X POST "${JSON[@]}" "$URL/v1/models/$MODEL/risk" -d '{"weights":{"BLDN.VLM":0.5,"NELE.VLM":0.5},"scale":"annual"}'
step "Inverse of the covariance (precision matrix), by Woodbury on the factor form" \
    -X POST "${JSON[@]}" "$URL/v1/models/$MODEL/precision" -d '{"tickers":["BLDN.VLM","BNDX.VLM","BRND.VLM"],"scale":"annual"}'
step "Minimum-variance weights of a ticker list (fully invested, unconstrained) and their volatility" \
    -X POST "${JSON[@]}" "$URL/v1/models/$MODEL/minimum-variance" -d '{"tickers":'"$TICKERS"',"scale":"annual"}'

# Long work runs as jobs: stored, run in the background by one instance, resumed after a restart.
step "A range backfill is a job: 202 with the job and Location: /v1/jobs/{id} (one fit per last trading date of each week)" \
    -X POST "${JSON[@]}" "$URL/v1/models/tour-6m/fits" -d '{"from":"2026-09-01","to":"2026-11-27","every":"week"}'
JOB_ID=$(curl -sS "${AUTH[@]}" "$URL/v1/jobs" | sed -n 's/^{"jobs":\[{"id":\([0-9]*\).*/\1/p' || true)
step "Its progress (done, total, etaSeconds) and what it did: fits made, dates skipped, failed dates with the reason" \
    "$URL/v1/jobs/${JOB_ID:-1}"
step "The same range again: every date is skipped (already fitted with this spec version)" \
    -X POST "${JSON[@]}" "$URL/v1/models/tour-6m/fits" -d '{"from":"2026-09-01","to":"2026-11-27","every":"week"}'

step "Evaluations: the demo's first start evaluated both demo models next to two baselines" "$URL/v1/evaluations"
DEMO_EVAL=$(curl -sS "${AUTH[@]}" "$URL/v1/evaluations" | sed -n 's/.*{"id":\([0-9]*\),"state":"done".*/\1/p' || true)
step "Its results: bias statistic b (1 = right; band = its 95 % range), QLIKE, log-likelihood, minimum-variance volatility" \
    "$URL/v1/evaluations/${DEMO_EVAL:-3}"
step "Start one of your own: 202, Location: /v1/evaluations/{id}" \
    -X POST "${JSON[@]}" "$URL/v1/evaluations" \
    -d '{"models":["tour-6m","'"$MODEL"'"],"from":"2026-09-01","to":"2026-11-20","every":"week","horizonDays":5,"random":{"count":20,"names":30},"baselines":["ledoit-wolf"]}'
EVAL_ID=$(curl -sS "${AUTH[@]}" "$URL/v1/evaluations" | sed -n 's/^{"evaluations":\[{"id":\([0-9]*\).*/\1/p' || true)
step "Watch its progress" "$URL/v1/jobs/${EVAL_ID:-1}"
for _ in $(seq 1 120); do
    curl -sS "${AUTH[@]}" "$URL/v1/jobs/${EVAL_ID:-1}" | grep -q '"state":"\(done\|failed\|cancelled\)"' && break
    sleep 0.5
done
step "Read it once done" "$URL/v1/evaluations/${EVAL_ID:-1}"
step "Its per-date series as CSV: z of the equal portfolio, minimum-variance return and forecast volatility" \
    -H 'Accept: text/csv' "$URL/v1/evaluations/${EVAL_ID:-1}/series"

step "Clean up the tour's own model (its jobs stay listed)" -X DELETE "$URL/v1/models/tour-6m"
echo
echo "Tour done. Every query answer names the fit it used in \"fit\"."
