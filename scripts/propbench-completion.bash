# propbench-completion.bash - bash completion for propbench (installed by
# make install into share/bash-completion/completions/propbench). Verbs,
# each verb's options (read from `propbench VERB --help` when completing, so
# they never fall behind the program), and method, problem and suite names
# (from `propbench list`, plug-ins included through PB_PLUGINS).

_propbench_names()
{
    # first column of `propbench list KIND`, header line skipped
    "$1" list "$2" 2>/dev/null | awk 'NR > 1 && $1 != "" { print $1 }'
}

_propbench()
{
    local cur prev bin verb
    cur="${COMP_WORDS[COMP_CWORD]}"
    prev="${COMP_WORDS[COMP_CWORD-1]}"
    bin="${COMP_WORDS[0]}"
    local verbs="list run sweep merge report baseline check select score selftest help"
    if [ "$COMP_CWORD" -eq 1 ]; then
        COMPREPLY=($(compgen -W "$verbs --help --version" -- "$cur"))
        return
    fi
    verb="${COMP_WORDS[1]}"
    case "$verb" in
    help)
        [ "$COMP_CWORD" -eq 2 ] && COMPREPLY=($(compgen -W "$verbs" -- "$cur"))
        return ;;
    list)
        [ "$COMP_CWORD" -eq 2 ] && COMPREPLY=($(compgen -W "methods problems suites" -- "$cur"))
        return ;;
    esac
    local list
    case "$prev" in
    --method) COMPREPLY=($(compgen -W "$(_propbench_names "$bin" methods)" -- "$cur")); return ;;
    --problem) COMPREPLY=($(compgen -W "$(_propbench_names "$bin" problems)" -- "$cur")); return ;;
    --suite) COMPREPLY=($(compgen -W "$(_propbench_names "$bin" suites)" -- "$cur")); return ;;
    --methods|--problems)
        # comma lists: complete the item after the last comma
        local kind=methods head="" item="$cur"
        [ "$prev" = --problems ] && kind=problems
        case "$cur" in *,*) head="${cur%,*},"; item="${cur##*,}" ;; esac
        list="$(_propbench_names "$bin" "$kind")"
        COMPREPLY=($(compgen -P "$head" -W "$list" -- "$item"))
        return ;;
    --formulation) COMPREPLY=($(compgen -W "cartesian sundman ks" -- "$cur")); return ;;
    --out|--baseline|--junit|--markdown|--problem-file|--plugin|--ephemeris|--ephemeris-out|--truth-out|--cache|--gnuplot)
        COMPREPLY=($(compgen -f -- "$cur")); return ;;
    --require)
        COMPREPLY=($(compgen -W "pos_err_max_m\<= energy_rel_max\<= pos_err_max\<= vel_err_max\<= evals\<=" -- "$cur"))
        return ;;
    esac
    if [[ "$cur" == -* ]]; then
        list="$("$bin" "$verb" --help 2>/dev/null | grep -o -- '--[a-z][a-z0-9-]*' | sort -u)"
        COMPREPLY=($(compgen -W "$list --help" -- "$cur"))
        return
    fi
    # run folders and files (RUN_DIR, SHARD_DIR)
    COMPREPLY=($(compgen -f -- "$cur"))
}
complete -F _propbench propbench
