#!/usr/bin/env bash
# Dev/CI services for reefd's integration tests: Mosquitto, InfluxDB 1.x, VictoriaMetrics
# (Debian packages) and a single-node Apache Kafka broker in KRaft mode (jars from Maven).
#
#   deploy/dev/services.sh up       install what is missing, start what is not running, wait until ready
#   deploy/dev/services.sh down [NAME...]  stop what this state folder started (data is kept)
#   deploy/dev/services.sh status   one line per service; exit 0 only when all are up and answering
#   deploy/dev/services.sh clean    down, then delete the state folder
#
# Each service listens on its own fixed loopback port (deploy/dev/services.env), keeps its data,
# config, pid file and log under $REEFD_SERVICES_DIR (default /tmp/reefd-services), and is started
# directly in the background (no systemd). Environment:
#   REEFD_SERVICES_DIR        state folder (default /tmp/reefd-services)
#   REEFD_CACHE_DIR           where the Kafka jars are cached (default <repo>/.cache)
#   REEFD_SERVICES_TIMEOUT_S  readiness timeout per service in seconds (default 90)
set -euo pipefail

HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
REPO="$(cd "$HERE/../.." && pwd)"
STATE="${REEFD_SERVICES_DIR:-/tmp/reefd-services}"
CACHE="${REEFD_CACHE_DIR:-$REPO/.cache}"
TIMEOUT_S="${REEFD_SERVICES_TIMEOUT_S:-90}"
# The shared broker runs the current Kafka line (4.x); the fault suite's private brokers run the previous
# line (test/faults/helpers/kafka.ts), so both stay tested. kafkajs speaks to both.
KAFKA_VERSION="${REEFD_KAFKA_VERSION:-4.4.0}"
KAFKA_FAULTS_VERSION=3.9.2 # keep in step with test/faults/helpers/kafka.ts
KAFKA_HOME="$CACHE/kafka/$KAFKA_VERSION"
SERVICES=(mosquitto influxdb victoriametrics kafka)
STARTED_NOW=""

# Addresses come from services.env; a variable already set in the environment wins (e.g. to run
# a second set of services on other ports with another REEFD_SERVICES_DIR).
while IFS='=' read -r key value; do
  [[ "$key" =~ ^REEFD_[A-Z0-9_]+$ ]] || continue
  [[ -n "${!key:-}" ]] || printf -v "$key" '%s' "$value"
  export "${key?}"
done <"$HERE/services.env"

hostport() { local u="${1#*://}"; u="${u%%/*}"; echo "${u%%,*}"; }
MQTT_ADDR="$(hostport "$REEFD_TEST_MQTT_URL")"
KAFKA_ADDR="$(hostport "$REEFD_TEST_KAFKA_BROKERS")"
VM_ADDR="$(hostport "$REEFD_TEST_VM_URL")"
INFLUX_ADDR="$(hostport "$REEFD_TEST_INFLUX1_URL")"
KAFKA_CONTROLLER_ADDR="$REEFD_TEST_KAFKA_CONTROLLER"
INFLUX_RPC_ADDR="$REEFD_TEST_INFLUX1_RPC"

log() { printf '[services] %s\n' "$*" >&2; }
die() {
  printf '[services] ERROR: %s\n' "$*" >&2
  exit 1
}

addr_of() {
  case "$1" in
    mosquitto) echo "$MQTT_ADDR" ;;
    influxdb) echo "$INFLUX_ADDR" ;;
    victoriametrics) echo "$VM_ADDR" ;;
    kafka) echo "$KAFKA_ADDR" ;;
  esac
}
logfile_of() {
  case "$1" in
    mosquitto) echo "$STATE/mosquitto/log/mosquitto.log" ;;
    kafka) echo "$STATE/kafka/logs/server.log" ;;
    *) echo "$STATE/$1/$1.log" ;;
  esac
}
pidfile_of() { echo "$STATE/$1/$1.pid"; }

# The process in the pid file is alive and is still this service (a stale pid file after a reboot
# or a killed session can name an unrelated process that reused the pid).
pid_alive() {
  local pf pid pattern
  pf="$(pidfile_of "$1")"
  [[ -s "$pf" ]] || return 1
  pid="$(cat "$pf")"
  kill -0 "$pid" 2>/dev/null || return 1
  case "$1" in
    mosquitto) pattern=mosquitto ;;
    influxdb) pattern=influxd ;;
    victoriametrics) pattern=victoria-metrics ;;
    kafka) pattern=kafka.Kafka ;;
  esac
  [[ ! -r "/proc/$pid/cmdline" ]] || tr '\0' ' ' <"/proc/$pid/cmdline" | grep -q -- "$pattern"
}

port_open() {
  local host="${1%:*}" port="${1##*:}"
  timeout 2 bash -c "exec 3<>/dev/tcp/$host/$port" 2>/dev/null
}

# --- installation -----------------------------------------------------------------------------

ensure_packages() {
  local missing=()
  command -v mosquitto >/dev/null || [[ -x /usr/sbin/mosquitto ]] || missing+=(mosquitto)
  command -v mosquitto_sub >/dev/null || missing+=(mosquitto-clients)
  command -v influxd >/dev/null || missing+=(influxdb)
  command -v victoria-metrics >/dev/null || missing+=(victoria-metrics)
  command -v curl >/dev/null || missing+=(curl)
  command -v java >/dev/null || missing+=(openjdk-17-jre-headless)
  command -v mvn >/dev/null || { [[ -f "$KAFKA_HOME/.complete" ]] && [[ -f "$CACHE/kafka/$KAFKA_FAULTS_VERSION/.complete" ]]; } || missing+=(maven)
  # Debian's Chromium for the dashboard's browser test (playwright-core drives /usr/bin/chromium).
  [[ -x /usr/bin/chromium ]] || missing+=(chromium)
  # mount/losetup for the disk-full fault case (present on Debian; listed for minimal images).
  command -v mkfs.ext4 >/dev/null || missing+=(e2fsprogs)
  ((${#missing[@]} == 0)) && return 0
  [[ "$(id -u)" == 0 ]] || die "missing packages: ${missing[*]}; install them (sudo apt-get install ${missing[*]}) or run this script as root"
  log "installing Debian packages: ${missing[*]}"
  # Package scripts must not start the system-wide daemons on their default ports.
  local policy=/usr/sbin/policy-rc.d made_policy=0
  if [[ ! -e "$policy" ]]; then
    printf '#!/bin/sh\nexit 101\n' >"$policy" && chmod 755 "$policy" && made_policy=1
  fi
  local rc=0
  {
    DEBIAN_FRONTEND=noninteractive apt-get update -q &&
      DEBIAN_FRONTEND=noninteractive apt-get install -y -q --no-install-recommends "${missing[@]}"
  } >"$STATE/apt.log" 2>&1 || rc=$?
  ((made_policy)) && rm -f "$policy"
  if ((rc != 0)); then
    tail -n 30 "$STATE/apt.log" >&2
    die "apt-get failed (full log: $STATE/apt.log)"
  fi
}

# ensure_kafka_jars VERSION: the broker's jars in $CACHE/kafka/VERSION/libs (Maven, once).
ensure_kafka_jars() {
  local version="$1" home="$CACHE/kafka/$1"
  [[ -f "$home/.complete" ]] && return 0
  command -v mvn >/dev/null || die "mvn not found: install Maven (apt-get install maven) to fetch the Kafka broker"
  log "fetching Kafka $version broker jars with Maven into $home/libs"
  local tmp="$home.tmp.$$"
  rm -rf "$tmp"
  mkdir -p "$tmp"
  if ! mvn -B -q -f "$HERE/pom.xml" -Dkafka.version="$version" -Dkafka.libs.dir="$tmp/libs" package \
    >"$STATE/mvn.log" 2>&1; then
    tail -n 30 "$STATE/mvn.log" >&2
    rm -rf "$tmp"
    die "Maven could not fetch org.apache.kafka:kafka_2.13:$version (full log: $STATE/mvn.log)"
  fi
  ls "$tmp/libs"/kafka_2.13-*.jar >/dev/null 2>&1 || die "Maven ran but no kafka_2.13 jar was copied"
  touch "$tmp/.complete"
  rm -rf "$home"
  mv "$tmp" "$home"
}

# --- configuration ----------------------------------------------------------------------------

write_mosquitto_conf() {
  local d="$STATE/mosquitto"
  mkdir -p "$d/data" "$d/log"
  {
    echo "# Generated by deploy/dev/services.sh from deploy/dev/mosquitto.conf; edit that file instead."
    echo "persistence_location $d/data/"
    echo "log_dest file $d/log/mosquitto.log"
    echo "log_dest stderr"
    echo
    # The listener follows REEFD_TEST_MQTT_URL (services.env or the environment).
    sed "s/^listener .*/listener ${MQTT_ADDR##*:} ${MQTT_ADDR%:*}/" "$HERE/mosquitto.conf"
  } >"$d/mosquitto.conf"
  # Started as root, mosquitto drops to its own user: that user must write persistence and log.
  if [[ "$(id -u)" == 0 ]] && getent passwd mosquitto >/dev/null; then
    chown -R mosquitto: "$d/data" "$d/log"
  fi
}

write_influxdb_conf() {
  local d="$STATE/influxdb"
  mkdir -p "$d/meta" "$d/data" "$d/wal"
  cat >"$d/influxdb.conf" <<EOF
# Generated by deploy/dev/services.sh: InfluxDB 1.x for development and CI only (no auth, loopback).
reporting-disabled = true
bind-address = "$INFLUX_RPC_ADDR"

[meta]
  dir = "$d/meta"

[data]
  dir = "$d/data"
  wal-dir = "$d/wal"
  query-log-enabled = false
  index-version = "inmem"

[monitor]
  store-enabled = false

[http]
  enabled = true
  bind-address = "$INFLUX_ADDR"
  auth-enabled = false
  log-enabled = false
  flux-enabled = false

[ifql]
  enabled = false

[[graphite]]
  enabled = false
[[collectd]]
  enabled = false
[[opentsdb]]
  enabled = false
[[udp]]
  enabled = false

[continuous_queries]
  enabled = false
EOF
}

write_kafka_conf() {
  local d="$STATE/kafka"
  mkdir -p "$d/data" "$d/logs"
  cat >"$d/server.properties" <<EOF
# Generated by deploy/dev/services.sh: single-node KRaft broker for development and CI only.
process.roles=broker,controller
node.id=1
controller.quorum.voters=1@$KAFKA_CONTROLLER_ADDR
listeners=PLAINTEXT://$KAFKA_ADDR,CONTROLLER://$KAFKA_CONTROLLER_ADDR
advertised.listeners=PLAINTEXT://$KAFKA_ADDR
controller.listener.names=CONTROLLER
inter.broker.listener.name=PLAINTEXT
listener.security.protocol.map=CONTROLLER:PLAINTEXT,PLAINTEXT:PLAINTEXT
log.dirs=$d/data
num.partitions=4
auto.create.topics.enable=true
delete.topic.enable=true
default.replication.factor=1
min.insync.replicas=1
offsets.topic.replication.factor=1
offsets.topic.num.partitions=4
transaction.state.log.replication.factor=1
transaction.state.log.min.isr=1
transaction.state.log.num.partitions=4
group.initial.rebalance.delay.ms=0
log.retention.hours=24
log.segment.bytes=67108864
num.network.threads=2
num.io.threads=4
EOF
}

# --- start ------------------------------------------------------------------------------------

# spawn NAME OUTFILE CMD...: run detached in its own session, stdout and stderr to OUTFILE; the
# child writes its own pid file before it execs, so the pid is the daemon's own.
spawn() {
  local name="$1" out="$2"
  shift 2
  local pf i
  pf="$(pidfile_of "$name")"
  rm -f "$pf"
  setsid bash -c 'echo $$ >"$0"; exec "$@"' "$pf" "$@" >"$out" 2>&1 </dev/null &
  for ((i = 0; i < 50; i++)); do
    [[ -s "$pf" ]] && return 0
    sleep 0.1
  done
  die "$name did not start (no pid file $pf)"
}

check_port_free() {
  local name="$1" addr
  addr="$(addr_of "$name")"
  if port_open "$addr"; then
    die "$addr ($name) is already in use by a process this state folder ($STATE) did not start; stop it, or run 'deploy/dev/services.sh down' with the REEFD_SERVICES_DIR that started it"
  fi
}

start_mosquitto() {
  write_mosquitto_conf
  local bin
  bin="$(command -v mosquitto || echo /usr/sbin/mosquitto)"
  spawn mosquitto "$STATE/mosquitto/mosquitto.out" "$bin" -c "$STATE/mosquitto/mosquitto.conf"
}

start_influxdb() {
  write_influxdb_conf
  # influxd logs to stderr.
  spawn influxdb "$(logfile_of influxdb)" influxd run -config "$STATE/influxdb/influxdb.conf"
}

start_victoriametrics() {
  local d="$STATE/victoriametrics"
  mkdir -p "$d/data"
  # -search.latencyOffset=0s: points are searchable as soon as they are flushed (tests read back at once).
  # -retentionPeriod=100y: fixtures and replays carry old timestamps that the default 1 month would drop.
  # -dedup.minScrapeInterval=1ms: one sample per series and millisecond, so a batch written twice (spool
  # replay after a crash, a replayed archive) is stored once; reefd's exactly-once-in-effect relies on it.
  spawn victoriametrics "$(logfile_of victoriametrics)" victoria-metrics \
    -httpListenAddr="$VM_ADDR" \
    -storageDataPath="$d/data" \
    -retentionPeriod=100y \
    -search.latencyOffset=0s \
    -dedup.minScrapeInterval=1ms \
    -search.disableCache \
    -memory.allowedBytes=512MiB \
    -loggerLevel=INFO
}

start_kafka() {
  write_kafka_conf
  local d="$STATE/kafka" cp="$KAFKA_HOME/libs/*"
  local jvm=(-Xms256m -Xmx512m -XX:+UseG1GC -XX:MaxGCPauseMillis=20 -Djava.awt.headless=true
    "-Dkafka.logs.dir=$d/logs" "-Dlog4j.configuration=file:$HERE/kafka-log4j.properties"
    "-Dlog4j2.configurationFile=$HERE/kafka-log4j2.properties")
  if [[ ! -f "$d/data/meta.properties" ]]; then
    local cluster_id
    cluster_id="$(java -cp "$cp" "${jvm[@]}" kafka.tools.StorageTool random-uuid 2>>"$d/logs/storage.log")"
    java -cp "$cp" "${jvm[@]}" kafka.tools.StorageTool format -t "$cluster_id" -c "$d/server.properties" \
      >>"$d/logs/storage.log" 2>&1 || {
      tail -n 20 "$d/logs/storage.log" >&2
      die "kafka storage format failed (log: $d/logs/storage.log)"
    }
    log "kafka: formatted storage, cluster id $cluster_id"
  fi
  # Readiness looks for this start's "Kafka Server started" line: keep the previous log aside.
  [[ -f "$d/logs/server.log" ]] && mv -f "$d/logs/server.log" "$d/logs/server.log.prev"
  spawn kafka "$d/logs/kafka.out" java "${jvm[@]}" -cp "$cp" kafka.Kafka "$d/server.properties"
}

# --- readiness --------------------------------------------------------------------------------

# Kafka ApiVersions v0 request (api_key 18, correlation id 1, client id "reefd"); a ready broker
# answers with the same correlation id and error code 0.
kafka_answers() {
  local host="${KAFKA_ADDR%:*}" port="${KAFKA_ADDR##*:}"
  timeout 5 bash -c '
    exec 3<>"/dev/tcp/$0/$1" || exit 1
    printf "\x00\x00\x00\x0f\x00\x12\x00\x00\x00\x00\x00\x01\x00\x05reefd" >&3
    head -c 10 <&3 | od -An -tx1 | tr -d " \n"
  ' "$host" "$port" 2>/dev/null | grep -q '^\(..\)\{4\}000000010000$'
}

probe() {
  case "$1" in
    mosquitto)
      if command -v mosquitto_sub >/dev/null; then
        mosquitto_sub -h "${MQTT_ADDR%:*}" -p "${MQTT_ADDR##*:}" -t '$SYS/broker/version' -C 1 -W 3 >/dev/null 2>&1
      else
        port_open "$MQTT_ADDR"
      fi
      ;;
    influxdb) curl -fsS -o /dev/null --max-time 3 "http://$INFLUX_ADDR/ping" 2>/dev/null ;;
    victoriametrics) [[ "$(curl -fsS --max-time 3 "http://$VM_ADDR/health" 2>/dev/null)" == OK ]] ;;
    kafka) kafka_answers ;;
  esac
}

show_log_tail() {
  local name="$1" f
  for f in "$(logfile_of "$name")" "$STATE/$name/$name.out" "$STATE/kafka/logs/kafka.out"; do
    [[ "$f" == */kafka.out && "$name" != kafka ]] && continue
    if [[ -s "$f" ]]; then
      printf -- '--- last lines of %s ---\n' "$f" >&2
      tail -n 40 "$f" >&2
    fi
  done
}

# started_now: the broker's own start-up line is awaited too (belt and braces: it answers
# ApiVersions only once its request handlers are enabled at the end of start-up).
ready() {
  probe "$1" || return 1
  if [[ "$1" == kafka && " $STARTED_NOW " == *" kafka "* ]]; then
    grep -q 'Kafka Server started' "$(logfile_of kafka)" 2>/dev/null || return 1
  fi
}

wait_ready() {
  local name="$1" start=$SECONDS
  while ! ready "$name"; do
    if ! pid_alive "$name"; then
      show_log_tail "$name"
      die "$name exited during start-up (see the log above)"
    fi
    if ((SECONDS - start >= TIMEOUT_S)); then
      show_log_tail "$name"
      die "$name not ready on $(addr_of "$name") after ${TIMEOUT_S}s (see the log above)"
    fi
    sleep 0.5
  done
  log "$name ready on $(addr_of "$name") ($((SECONDS - start))s)"
}

# --- commands ---------------------------------------------------------------------------------

cmd_up() {
  mkdir -p "$STATE"
  # Daemons that drop privileges (mosquitto) must be able to enter the state folder.
  chmod 755 "$STATE"
  ensure_packages
  # Always: the fault suite starts private brokers from these jars even when the shared one runs already.
  ensure_kafka_jars "$KAFKA_VERSION"
  ensure_kafka_jars "$KAFKA_FAULTS_VERSION"
  local name
  for name in "${SERVICES[@]}"; do
    if pid_alive "$name"; then
      log "$name already running (pid $(cat "$(pidfile_of "$name")"))"
      continue
    fi
    check_port_free "$name"
    mkdir -p "$STATE/$name"
    "start_$name"
    STARTED_NOW+=" $name"
  done
  for name in "${SERVICES[@]}"; do
    wait_ready "$name"
  done
  log "all services up (state: $STATE); addresses in deploy/dev/services.env"
}

stop_one() {
  local name="$1" pf pid i
  pf="$(pidfile_of "$name")"
  if ! pid_alive "$name"; then
    rm -f "$pf"
    return 0
  fi
  pid="$(cat "$pf")"
  kill -TERM "$pid" 2>/dev/null || true
  # Kafka's controlled shutdown takes a few seconds; the others stop at once.
  for ((i = 0; i < 300; i++)); do
    kill -0 "$pid" 2>/dev/null || break
    sleep 0.1
  done
  if kill -0 "$pid" 2>/dev/null; then
    log "$name (pid $pid) ignored SIGTERM for 30 s; sending SIGKILL"
    kill -KILL "$pid" 2>/dev/null || true
  fi
  rm -f "$pf"
  log "$name stopped"
}

cmd_down() {
  [[ -d "$STATE" ]] || {
    log "nothing to stop ($STATE does not exist)"
    return 0
  }
  local name pids=() names=("$@")
  ((${#names[@]} > 0)) || names=("${SERVICES[@]}")
  for name in "${names[@]}"; do
    [[ " ${SERVICES[*]} " == *" $name "* ]] || die "unknown service '$name' (one of: ${SERVICES[*]})"
  done
  for name in "${names[@]}"; do
    stop_one "$name" &
    pids+=($!)
  done
  local p rc=0
  for p in "${pids[@]}"; do wait "$p" || rc=1; done
  return $rc
}

cmd_status() {
  local name all=0 state pid
  for name in "${SERVICES[@]}"; do
    pid="-"
    if pid_alive "$name"; then
      pid="$(cat "$(pidfile_of "$name")")"
      if probe "$name"; then state=up; else
        state="running, not answering"
        all=1
      fi
    elif port_open "$(addr_of "$name")"; then
      state="port in use by another process"
      all=1
    else
      state=down
      all=1
    fi
    printf '%-16s %-30s pid %-8s %-16s log %s\n' "$name" "$state" "$pid" "$(addr_of "$name")" "$(logfile_of "$name")"
  done
  return $all
}

case "${1:-}" in
  up) cmd_up ;;
  down)
    shift
    cmd_down "$@"
    ;;
  status) cmd_status ;;
  clean)
    cmd_down
    [[ "$STATE" == / ]] || rm -rf "$STATE"
    log "removed $STATE"
    ;;
  *)
    echo "usage: $0 up | down [${SERVICES[*]}] | status | clean" >&2
    exit 2
    ;;
esac
