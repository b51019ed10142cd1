#!/usr/bin/env bash
# Module layering check: lists what each module of src/ imports from the
# crate (`crate::`, `super::`, `self::` paths, in `use` lines and inline
# paths) and fails when two modules import each other, directly or around a
# loop. Checked at every level: between top-level modules (`playfile`,
# `plays`, ...) and between sibling submodules (`playfile::read`,
# `playfile::validate`, ...). A parent using its own children is not a cycle.
#
#   tools/layers.sh          # dependencies per top-level module, then the verdict
#   tools/layers.sh -v       # also every submodule's dependencies
#   tools/layers.sh --top    # fail only on cycles between top-level modules
#
# Needs only bash and awk. Exit status 0: no cycle; 1: a cycle (printed).
set -euo pipefail
cd "$(dirname "$0")/.."
verbose=0
toponly=0
for arg in "$@"; do
    case "$arg" in
        -v) verbose=1 ;;
        --top) toponly=1 ;;
        *) echo "usage: tools/layers.sh [-v] [--top]" >&2; exit 2 ;;
    esac
done

mapfile -t files < <(find src -name '*.rs' ! -path src/main.rs | LC_ALL=C sort)
awk -v verbose="$verbose" -v toponly="$toponly" '
# ------------------------------------------------------------ module names
function modname(f,   m) {
    m = f
    sub(/^src\//, "", m)
    sub(/\.rs$/, "", m)
    if (m == "lib") return ""
    sub(/\/mod$/, "", m)
    gsub(/\//, "::", m)
    return m
}
function join(a, b) { return a == "" ? b : (b == "" ? a : a "::" b) }
function parent(m,   i) {
    i = lastcolons(m)
    return i ? substr(m, 1, i - 1) : ""
}
function lastcolons(m,   i, last) {
    last = 0
    for (i = 1; i < length(m); i++) if (substr(m, i, 2) == "::") last = i
    return last
}
# ------------------------------------------------------------ path expansion
# Expand "a::{b, c::{d, e}}" (text after a root like crate::) into
# full paths under `base`, separated by SUBSEP-free "\n".
function expand(base, text,   out, i, c, depth, head, inner, parts, n, k, item) {
    gsub(/[ \t\r\n]/, "", text)
    i = index(text, "{")
    if (i == 0) return join(base, text)
    head = substr(text, 1, i - 1)
    sub(/::$/, "", head)
    inner = substr(text, i + 1)
    sub(/}$/, "", inner)
    # split inner on top-level commas
    n = 0; depth = 0; item = ""
    for (k = 1; k <= length(inner); k++) {
        c = substr(inner, k, 1)
        if (c == "{") depth++
        if (c == "}") depth--
        if (c == "," && depth == 0) { parts[++n] = item; item = ""; continue }
        item = item c
    }
    if (item != "") parts[++n] = item
    out = ""
    for (k = 1; k <= n; k++) {
        if (parts[k] == "self") { out = out "\n" join(base, head); continue }
        sub(/ as .*$/, "", parts[k])
        out = out "\n" expand(join(base, head), parts[k])
    }
    return substr(out, 2)
}
# The path text that follows position `at` in `s`: identifiers and ::, plus a
# balanced {...} group if one follows.
function pathtext(s, at,   k, c, depth, out) {
    out = ""; depth = 0
    for (k = at; k <= length(s); k++) {
        c = substr(s, k, 1)
        if (depth == 0 && c !~ /[A-Za-z0-9_:{]/) break
        if (c == "{") depth++
        if (c == "}") { depth--; out = out c; if (depth == 0) break; continue }
        out = out c
    }
    sub(/::$/, "", out)
    return out
}
function record(from, paths,   n, k, arr) {
    n = split(paths, arr, "\n")
    for (k = 1; k <= n; k++) {
        if (arr[k] == "" || arr[k] == "*") continue
        sub(/::\*$/, "", arr[k])
        refs[from, ++nref[from]] = arr[k]
    }
    if (!(from in seenmod)) { seenmod[from] = 1; order[++nmods] = from }
}
# Scan one logical line for crate::, super::, self:: roots.
function scan(s, mod,   rest, pos, root, base, t, up) {
    rest = s
    while (match(rest, /(crate|super|self)::/)) {
        pos = RSTART
        if (pos > 1 && substr(rest, pos - 1, 1) ~ /[A-Za-z0-9_:]/) { rest = substr(rest, pos + RLENGTH); continue }
        root = substr(rest, pos, RLENGTH - 2)
        rest = substr(rest, pos + RLENGTH)
        if (root == "crate") base = ""
        else if (root == "self") base = mod
        else {
            base = parent(mod)
            while (substr(rest, 1, 7) == "super::") { base = parent(base); rest = substr(rest, 8) }
        }
        t = pathtext(rest, 1)
        if (t == "") continue
        record(mod, expand(base, t))
        rest = substr(rest, length(t) + 1)
    }
}
FNR == 1 {
    filemod = modname(FILENAME)
    known[filemod] = 1
    depth = 0; nstack = 0; pending = ""
}
{
    line = $0
    if (line ~ /^[ \t]*\/\//) next
    sub(/[ \t]\/\/.*$/, "", line)
    gsub(/"([^"\\]|\\.)*"/, "\"\"", line)
    gsub(/'\''[{}]'\''/, "", line)
    # inline `mod name {`
    if (match(line, /^[ \t]*(pub(\([a-z]+\))? )?mod [A-Za-z0-9_]+ *\{/)) {
        nm = line; sub(/^[ \t]*(pub(\([a-z]+\))? )?mod /, "", nm); sub(/ *\{.*$/, "", nm)
        stack[++nstack] = nm; stackdepth[nstack] = depth
        known[join(curmod(), "")] = 1
    }
    # a `use` statement may span lines: collect up to its semicolon
    if (pending != "" || line ~ /^[ \t]*(pub(\([a-z]+\))? )?use /) {
        pending = pending " " line
        if (line ~ /;/) { scan(pending, curmod()); pending = "" }
    } else if (line ~ /(crate|super|self)::/) {
        scan(line, curmod())
    }
    opens = gsub(/\{/, "{", line); closes = gsub(/\}/, "}", line)
    depth += opens - closes
    while (nstack > 0 && depth <= stackdepth[nstack]) nstack--
}
function curmod(   m, k) {
    m = filemod
    for (k = 1; k <= nstack; k++) m = join(m, stack[k])
    return m
}
# ------------------------------------------------------------ graph
function target(path,   p) {
    # the longest known module the path starts with
    p = path
    while (p != "" && !(p in known)) p = parent(p)
    return p
}
function top(m,   i) { i = index(m, "::"); return i ? substr(m, 1, i - 1) : m }
function addedge(a, b) {
    if (a == b || a == "" || b == "") return
    if (!((a, b) in edge)) { edge[a, b] = 1; if (!(a in node)) { node[a] = 1; nodes[++nn] = a } if (!(b in node)) { node[b] = 1; nodes[++nn] = b } }
}
END {
    for (f = 1; f <= nmods; f++) {
        from = order[f]
        for (k = 1; k <= nref[from]; k++) {
            t = target(refs[from, k])
            if (t == "" || t == from) continue
            dep[from, t] = 1
            # The first level where the two paths part: those two siblings.
            na = split(from, A, "::"); nb = split(t, B, "::")
            pre = ""; lvl = 1
            while (lvl <= na && lvl <= nb && A[lvl] == B[lvl]) { pre = join(pre, A[lvl]); lvl++ }
            if (lvl > na || lvl > nb) continue   # one contains the other
            addedge(join(pre, A[lvl]), join(pre, B[lvl]))
        }
    }
    # transitive closure (a few dozen nodes)
    for (i = 1; i <= nn; i++) for (j = 1; j <= nn; j++) reach[nodes[i], nodes[j]] = ((nodes[i], nodes[j]) in edge)
    for (k = 1; k <= nn; k++) for (i = 1; i <= nn; i++) if (reach[nodes[i], nodes[k]]) for (j = 1; j <= nn; j++) if (reach[nodes[k], nodes[j]]) reach[nodes[i], nodes[j]] = 1
    # listing
    print "imports per module (from -> modules it uses; parents using children omitted)"
    for (i = 1; i <= nn; i++) {
        a = nodes[i]
        if (!verbose && index(a, "::")) continue
        s = ""
        for (j = 1; j <= nn; j++) if ((a, nodes[j]) in edge) s = s " " nodes[j]
        names[++nlist] = sprintf("  %-22s ->%s", a, s == "" ? " (nothing)" : s)
    }
    # sort the listing by name (insertion sort; short list)
    for (i = 2; i <= nlist; i++) { v = names[i]; j = i - 1; while (j > 0 && names[j] > v) { names[j + 1] = names[j]; j-- } names[j + 1] = v }
    for (i = 1; i <= nlist; i++) print names[i]
    # top-level modules, bottom layer first (each imports only earlier ones)
    layers = ""; placed_n = 0; ntop = 0
    for (i = 1; i <= nn; i++) if (!index(nodes[i], "::")) top_[++ntop] = nodes[i]
    for (round = 1; round <= ntop; round++) {
        row = ""
        for (i = 1; i <= ntop; i++) {
            a = top_[i]
            if (a in placed) continue
            ready = 1
            for (j = 1; j <= ntop; j++) if (((a, top_[j]) in edge) && !(top_[j] in placed)) ready = 0
            if (ready) { row = row " " a; now[a] = 1 }
        }
        if (row == "") break
        for (a in now) { placed[a] = 1; placed_n++ }
        for (a in now) delete now[a]
        layers = layers sprintf("\n  %2d:%s", round, row)
    }
    if (placed_n == ntop) print "\nlayers, bottom first (each imports only layers below it):" layers
    # strongly connected groups: modules that reach each other
    bad = 0
    for (i = 1; i <= nn; i++) {
        a = nodes[i]
        if (a in grouped) continue
        if (toponly && index(a, "::")) continue
        members = a; size = 1
        for (j = i + 1; j <= nn; j++) {
            b = nodes[j]
            if (reach[a, b] && reach[b, a]) { members = members " " b; size++; grouped[b] = 1 }
        }
        if (size == 1) continue
        if (!bad) print "\nCYCLES (modules that import each other, directly or around a loop):"
        bad = 1
        n = split(members, m, " ")
        links = ""
        for (x = 1; x <= n; x++) for (y = 1; y <= n; y++) if ((m[x], m[y]) in edge) links = links " " m[x] "->" m[y]
        print "  " members "\n    imports among them:" links
    }
    if (!bad) {
        if (toponly) print "\nno import cycles between the " ntop " top-level modules"
        else print "\nno import cycles among " nn " modules and submodules"
        exit 0
    }
    exit 1
}
' "${files[@]}"
