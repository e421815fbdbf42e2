#!/usr/bin/env bash
# run-shards.sh: run the N shards of one pulsewright sweep as N processes
# on this machine, then merge them into the output the unsharded run
# writes, byte for byte.
#
#   deploy/local/run-shards.sh [-n N] [-d DIR] [-o OUT] [-j JOBS] [-f FORMAT] [--only K[,K…]] -- COMMAND ARGS…
#
#   -n N        number of shards (default: the number of processors)
#   -d DIR      where the shard outputs and logs go (default: shards)
#   -o OUT      the merged output (default: DIR/merged.csv)
#   -j JOBS     --jobs given to each shard (default 1: N processes already
#               fill N processors)
#   -f FORMAT   trials only: the merged result's format, text, json or csv
#               (default: merge's, text); a sweep's merge is its CSV
#   --only K,…  run only these shards (after one failed or was stopped),
#               then merge all N from DIR
#   COMMAND ARGS…  the pulsewright command and its arguments, without
#               --shard and --out, e.g. sweep demo:harbour-skiff --set seed=1:40:1
#
# The program is $PULSEWRIGHT, or pulsewright on the PATH. Shard K of N
# writes DIR/shard-K-of-N.csv and its messages to DIR/shard-K-of-N.log.
# When a shard fails the script says which, leaves the others' outputs in
# place and exits 1 without merging; run it again with --only K.
# Ctrl-C or SIGTERM stops every shard (each keeps the rows it finished; merge refuses
# such a shard as interrupted until it is re-run).
#
# Exit status: 0 merged; 1 a shard or the merge failed; 2 usage;
# 130 interrupted.
set -u -o pipefail

prog=${PULSEWRIGHT:-pulsewright}
n=$(getconf _NPROCESSORS_ONLN 2>/dev/null || echo 2)
dir=shards
out=
jobs=1
only=
format=

usage() {
	sed -n '2,/^$/{s/^# \{0,1\}//;p}' "$0" >&2
	exit 2
}

while [ $# -gt 0 ]; do
	case $1 in
	-n) n=${2-}; shift 2 || usage ;;
	-d) dir=${2-}; shift 2 || usage ;;
	-o) out=${2-}; shift 2 || usage ;;
	-j) jobs=${2-}; shift 2 || usage ;;
	-f) format=${2-}; shift 2 || usage ;;
	--only) only=${2-}; shift 2 || usage ;;
	--) shift; break ;;
	-h | --help) usage ;;
	*) echo "run-shards: unknown option $1 (the command goes after --)" >&2; exit 2 ;;
	esac
done
[ $# -gt 0 ] || { echo "run-shards: no command after --" >&2; exit 2; }
case $n in
'' | *[!0-9]*) echo "run-shards: -n $n is not a whole number (valid: 1…100000)" >&2; exit 2 ;;
esac
if [ "$n" -lt 1 ] || [ "$n" -gt 100000 ]; then
	echo "run-shards: -n $n is outside 1…100000" >&2
	exit 2
fi
case $format in
'' | text | json | csv) ;;
*) echo "run-shards: -f $format is not text, json or csv" >&2; exit 2 ;;
esac
case $jobs in
'' | *[!0-9]*) echo "run-shards: -j $jobs is not a whole number (0: one per core)" >&2; exit 2 ;;
esac
for a in "$@"; do
	case $a in
	--shard | --shard=* | --out | --out=*)
		echo "run-shards: give the command without $a: the script sets --shard and --out" >&2
		exit 2
		;;
	esac
done
out=${out:-$dir/merged.csv}
mkdir -p "$dir" || exit 1

shards=()
if [ -n "$only" ]; then
	IFS=, read -r -a shards <<<"$only"
	for k in "${shards[@]}"; do
		case $k in
		'' | *[!0-9]*) echo "run-shards: --only $only: $k is not a shard index (valid: 0…$((n - 1)))" >&2; exit 2 ;;
		esac
		if [ "$k" -ge "$n" ]; then
			echo "run-shards: --only $only: shard $k is outside 0…$((n - 1))" >&2
			exit 2
		fi
	done
else
	for ((k = 0; k < n; k++)); do shards+=("$k"); done
fi

pids=()
stop() {
	echo "run-shards: interrupted; stopping ${#pids[@]} shard(s)" >&2
	for p in "${pids[@]}"; do kill -INT "$p" 2>/dev/null; done
	wait
	exit 130
}
trap stop INT TERM

for k in "${shards[@]}"; do
	base=$dir/shard-$k-of-$n
	"$prog" "$@" --jobs "$jobs" --shard "$k/$n" --out "$base.csv" >"$base.log" 2>&1 &
	pids+=("$!")
done

failed=0
for i in "${!pids[@]}"; do
	k=${shards[$i]}
	if wait "${pids[$i]}"; then
		:
	else
		st=$?
		echo "run-shards: shard $k/$n failed (exit $st); re-run it with --only $k; the end of $dir/shard-$k-of-$n.log:" >&2
		tail -n 3 "$dir/shard-$k-of-$n.log" | sed 's/^/    /' >&2
		failed=1
	fi
done
trap - INT TERM
[ "$failed" -eq 0 ] || exit 1

files=()
for ((k = 0; k < n; k++)); do
	[ -e "$dir/shard-$k-of-$n.csv" ] && files+=("$dir/shard-$k-of-$n.csv")
done
if [ "${#files[@]}" -eq 0 ]; then
	echo "run-shards: no shard outputs in $dir" >&2
	exit 1
fi
"$prog" merge "${files[@]}" ${format:+--format "$format"} --out "$out" || exit 1
echo "run-shards: merged $n shard(s) into $out" >&2
