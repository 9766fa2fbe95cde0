# bash completion for lampwick.  Everything it offers comes from lampwick
# itself at the moment of completing, so it cannot drift from the program:
# the commands from `lampwick help`, each command's options from `lampwick
# help COMMAND`, profile keys from `lampwick help keys`, cell names from
# `lampwick cells --format csv`, modes from the profile on the line.

_lampwick_commands() {
    lampwick help 2>/dev/null | sed -n 's/^  \([a-z]\{1,\}\( [a-z]\{1,\}\)\{0,1\}\) \{1,\}[A-Z.[].*/\1/p;s/^  \(cells\|help\) .*/\1/p' |
        awk '{print $1}' | sort -u
}

_lampwick_keys() {
    lampwick help keys 2>/dev/null | awk '
        /^  \[/ { gsub(/[][ ]/, ""); section = $0; next }
        /^    [a-z]/ && section != "" && !cell { print section "." $1 }
        /^Cell file keys/ { cell = 1 }'
}

_lampwick_cells() {
    lampwick cells --format csv 2>/dev/null | tail -n +2 | cut -d, -f1 | tr -d '\r'
}

_lampwick_modes() { # PROFILE
    [ -r "$1" ] && sed -n 's/^\[mode \(.*\)\]$/\1/p' "$1"
}

_lampwick() {
    local cur prev cmd i profile
    COMPREPLY=()
    cur=${COMP_WORDS[COMP_CWORD]}
    prev=${COMP_WORDS[COMP_CWORD - 1]}
    cmd=${COMP_WORDS[1]}
    if [ "$cmd" = fit ] && [ "${#COMP_WORDS[@]}" -gt 3 ]; then
        cmd="fit ${COMP_WORDS[2]}"
    fi
    if [ "$COMP_CWORD" -eq 1 ]; then
        mapfile -t COMPREPLY < <(compgen -W "$(_lampwick_commands) --help --version" -- "$cur")
        return
    fi
    if [ "$cmd" = fit ] && [ "$COMP_CWORD" -eq 2 ]; then
        mapfile -t COMPREPLY < <(compgen -W "led cell" -- "$cur")
        return
    fi
    if [ "$cmd" = help ]; then
        mapfile -t COMPREPLY < <(compgen -W "$(_lampwick_commands) keys" -- "$cur")
        return
    fi
    for ((i = 2; i < COMP_CWORD; i++)); do
        case ${COMP_WORDS[i]} in *.ini) profile=${COMP_WORDS[i]} ;; esac
    done
    case $prev in
        --set | --vary | --spread)
            compopt -o nospace 2>/dev/null
            mapfile -t COMPREPLY < <(compgen -W "$(_lampwick_keys | sed 's/$/=/')" -- "$cur")
            return ;;
        --mode)
            mapfile -t COMPREPLY < <(compgen -W "$(_lampwick_modes "$profile")" -- "$cur")
            return ;;
        --cells)
            mapfile -t COMPREPLY < <(compgen -W "$(_lampwick_cells) all" -- "$cur")
            return ;;
        --format)
            mapfile -t COMPREPLY < <(compgen -W "text csv md" -- "$cur")
            return ;;
        --sampling)
            mapfile -t COMPREPLY < <(compgen -W "random sobol" -- "$cur")
            return ;;
        --trace | --plot | --histogram | --ranking | --samples-out | --out | --use)
            mapfile -t COMPREPLY < <(compgen -f -- "$cur")
            return ;;
    esac
    if [[ $cur == -* ]]; then
        # shellcheck disable=SC2086
        mapfile -t COMPREPLY < <(compgen -W "$(lampwick help $cmd 2>/dev/null |
            sed -n 's/^  \(-h, \)\{0,1\}\(--[a-z-]*\).*/\2/p')" -- "$cur")
        return
    fi
    mapfile -t COMPREPLY < <(compgen -f -X '!*.ini' -- "$cur"; compgen -f -X '!*.csv' -- "$cur"
        compgen -d -- "$cur")
}
complete -F _lampwick lampwick
