#!/bin/sh
# The man page and the command reference name every program option that
# 'hone --help' prints, and the man page names every command of the table.
for f in docs/commands.md docs/hone.1; do
  [ -f "$f" ] || { echo "$f missing"; exit 1; }
done
opts=$("$HONE" --help | grep -o -- '--[a-z-]*\| -[a-z] ' | sort -u)
[ -n "$opts" ] || { echo "no options in --help"; exit 1; }
for o in $opts; do
  grep -q -- "$o" docs/commands.md || { echo "docs/commands.md lacks $o"; exit 1; }
  man_o=$(printf '%s' "$o" | sed 's/-/\\\\-/g')
  grep -q -- "$man_o" docs/hone.1 || { echo "docs/hone.1 lacks $o"; exit 1; }
done
cmds=$("$HONE" --json -c help | /usr/bin/python3 -c 'import json,sys; print(" ".join(json.loads(sys.stdin.read())["commands"]))') ||
  { echo "cannot list the commands"; exit 1; }
[ -n "$cmds" ] || { echo "no commands listed"; exit 1; }
for c in $cmds; do
  grep -q "\\\\fB$c\\\\fR" docs/hone.1 || { echo "docs/hone.1 does not name the command $c"; exit 1; }
done
exit 0
