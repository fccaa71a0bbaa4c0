#!/bin/sh
# Every translatable string of the sources (po/POTFILES) must be translated, and not fuzzy, in
# every language of po/LINGUAS: extracts a fresh template and compares each .po with msgcmp.
# Usage: check-complete.sh SOURCE_ROOT
set -eu
top=$1
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
cd "$top"
grep -v '^[[:space:]]*\(#\|$\)' po/POTFILES > "$tmp/files"
xgettext --from-code=UTF-8 --keyword=_ --keyword=N_ --keyword=C_:1c,2 --keyword=NC_:1c,2 \
  --keyword=g_dngettext:2,3 --keyword=ngettext:1,2 \
  --files-from="$tmp/files" --output="$tmp/loopwright.pot"
status=0
for lang in $(grep -v '^[[:space:]]*\(#\|$\)' po/LINGUAS); do
  if msgcmp "po/$lang.po" "$tmp/loopwright.pot"; then
    echo "po/$lang.po: complete"
  else
    echo "po/$lang.po: strings missing or untranslated (see above); run ninja loopwright-update-po and translate them" >&2
    status=1
  fi
done
exit $status
