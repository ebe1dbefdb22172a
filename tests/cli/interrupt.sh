#!/bin/sh
# Ctrl-C at the prompt, driven through a terminal multiplexer (tmux, on a
# private socket): Ctrl-C during a long scan returns to the prompt with the
# models finished so far kept; Ctrl-C at an idle prompt gives a fresh prompt
# and the session goes on; Ctrl-D leaves with exit code 0.
: "${HONE:=./hone}"
command -v tmux >/dev/null 2>&1 || { echo "tmux is not installed (tools/install-deps.sh adds it)"; exit 77; }
sock=hone-int-$$
sess=int
T() { tmux -L "$sock" "$@"; }
trap 'T kill-server 2>/dev/null' EXIT

screen() { T capture-pane -p -t "$sess" -S -300; }
# wait_for TEXT SECONDS: poll the screen until TEXT appears.
wait_for() {   # (text as a fixed string; wait_re takes an extended regex)
  i=0
  while [ $i -lt $(($2 * 10)) ]; do
    screen | grep -q${3:-F} -- "$1" && return 0
    sleep 0.1; i=$((i + 1))
  done
  echo "timed out waiting for: $1"; screen | tail -n 30; return 1
}

T new-session -d -s "$sess" -x 200 -y 60 \
  "env HONE_HISTORY=/dev/null NO_COLOR=1 LC_ALL=C '$HONE'; echo \"EXITED rc=\$?\"; sleep 60" || exit 1
wait_for "hone>" 20 || exit 1
# A long scan: 25 ARMA-GARCH models on 200000 observations (tens of seconds).
T send-keys -t "$sess" "simulate ar(1)+garch(1,1) n=200000 seed=5 set=mu:0,ar1:0.3,omega:0.1,alpha1:0.1,beta1:0.85" Enter
wait_for "working series: 200000 simulated values" 60 || exit 1
T send-keys -t "$sess" "scan p=0..4 q=0..4 garch=yes" Enter
# the progress line (stderr is the terminal): interrupt once a model is done
wait_for "scan: [0-9]+ of 25 models fitted" 300 E || exit 1
T send-keys -t "$sess" C-c
wait_for "(interrupted; back at the prompt)" 120 || exit 1
screen | grep -qF "scan interrupted; the finished models are kept" || { echo "no interrupt message"; exit 1; }
screen | grep -q "not fitted: interrupted" || { echo "scan table does not show the models left out"; exit 1; }
kept=$(screen | grep -cE '^ +\*? +[0-9]+  [a-z]')
[ "$kept" -ge 1 ] || { echo "no finished model in the scan table"; screen | tail -n 30; exit 1; }
[ "$kept" -lt 25 ] || { echo "the scan finished before Ctrl-C; nothing was tested"; exit 1; }

# The kept models are in the session.
T send-keys -t "$sess" "models" Enter
wait_for "current model; criteria compare only" 20 || exit 1

# A long single fit (tens of seconds): Ctrl-C stops it and adds no model.
T send-keys -t "$sess" "fit arma(4,4)+garch(1,1) t" Enter
sleep 1
T send-keys -t "$sess" C-c
wait_for "fit of arma(4,4)+garch(1,1) t interrupted; no model added" 120 || exit 1
T send-keys -t "$sess" "use $((kept + 1))" Enter
wait_for "no model $((kept + 1))" 20 || { echo "a model was added by the interrupted fit"; exit 1; }

# Ctrl-C at an idle prompt: a fresh prompt, the session still answers.
T send-keys -t "$sess" "abandoned half-typed line" C-c
T send-keys -t "$sess" C-c
T send-keys -t "$sess" "help quit" Enter
wait_for "end the session (also Ctrl-D)" 20 || exit 1
screen | grep -q "unknown command 'abandoned'" && { echo "the interrupted line was run"; exit 1; }

# Ctrl-D leaves cleanly.
T send-keys -t "$sess" C-d
wait_for "EXITED rc=0" 20 || exit 1
echo "interrupt: scan stopped with $kept models kept; idle Ctrl-C and Ctrl-D behave"
