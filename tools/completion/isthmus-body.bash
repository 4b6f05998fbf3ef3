
# The kind of a file, from its first bytes (docs/formats.md), into _isthmus_kind:
# dir, vectors, map, prep, result, verdict, candidates, gzip or other.
_isthmus_sniff()
{
    local head=
    _isthmus_kind=other
    if [[ -d $1 ]]; then
        _isthmus_kind=dir
        return
    fi
    [[ -f $1 && -r $1 ]] || return
    LC_ALL=C IFS= read -r -N 64 head < "$1" 2>/dev/null
    case $head in
        ISTHMUSV*) _isthmus_kind=vectors ;;
        ISTHMUSM*) _isthmus_kind=map ;;
        ISTPREP*) _isthmus_kind=prep ;;
        *'"isthmus result"'*) _isthmus_kind=result ;;
        *'"isthmus verdict"'*) _isthmus_kind=verdict ;;
        '# isthmus candidate list'*) _isthmus_kind=candidates ;;
        $'\x1f\x8b'*) _isthmus_kind=gzip ;;
    esac
}

# Whether a file of kind $2 fits an argument of kinds $1 (words; "X..." repeats).
_isthmus_fits()
{
    local k
    [[ $2 == dir ]] && return 0
    for k in $1; do
        case ${k%...}:$2 in
            any:* | vectors:vectors | vectors:other | vectors:gzip | corpus:prep | \
            corpus:other | corpus:gzip | text:other | text:gzip | result:result | \
            verdict:verdict | map:map | candidates:candidates | candidates:other)
                return 0 ;;
        esac
    done
    return 1
}

# File names starting with $2 that fit kinds $1; more than 500 are offered unsniffed.
_isthmus_files()
{
    local f
    local -a names=()
    [[ $1 == none ]] && return
    mapfile -t names < <(compgen -f -- "$2")
    compopt -o filenames 2>/dev/null
    if [[ " $1 " == *" any "* ]] || ((${#names[@]} > 500)); then
        COMPREPLY+=("${names[@]}")
        return
    fi
    for f in "${names[@]}"; do
        _isthmus_sniff "$f"
        _isthmus_fits "$1" "$_isthmus_kind" && COMPREPLY+=("$f")
    done
}

# Complete the value $3 of option $2 of command $1 ("" for a global option).
_isthmus_value()
{
    local kind=${_isthmus_argkind["$1 $2"]}
    case $kind in
        values:*) mapfile -t COMPREPLY < <(compgen -W "${kind#values:}" -- "$3") ;;
        none | '') ;;
        *) _isthmus_files "$kind" "$3" ;;
    esac
}

_isthmus()
{
    local i j=-1 w cur cmd= ci=0 prev pre= n kind join=0
    local -a words=()
    COMPREPLY=()
    # rejoin "--opt" "=" "value", which bash splits at '=' (COMP_WORDBREAKS)
    for ((i = 0; i <= COMP_CWORD; i++)); do
        w=${COMP_WORDS[i]}
        if [[ $w == = && $j -ge 0 && ${words[j]} == -* && ${words[j]} != *=* ]]; then
            words[j]+==
            join=1
        elif ((join)); then
            words[j]+=$w
            join=0
        else
            words[++j]=$w
        fi
    done
    cur=${words[j]}
    # when bash did not split at '=', a value's completions carry the option in front
    [[ ${COMP_WORDS[COMP_CWORD]} == -*=* ]] && pre=${cur%%=*}=
    for ((i = 1; i < j; i++)); do
        w=${words[i]}
        case $w in
            -*) [[ $w != *=* && -n ${_isthmus_argkind[" $w"]+set} ]] && ((i++)) ;;
            *) cmd=$w ci=$i; break ;;
        esac
    done
    if [[ -z $cmd ]]; then
        case $cur in
            -*=*) _isthmus_value "" "${cur%%=*}" "${cur#*=}" ;;
            -*) mapfile -t COMPREPLY < <(compgen -W "$_isthmus_global" -- "$cur") ;;
            *)
                prev=${words[j - 1]}
                if ((j > 1)) && [[ -n ${_isthmus_argkind[" $prev"]+set} ]]; then
                    _isthmus_value "" "$prev" "$cur"
                else
                    mapfile -t COMPREPLY < <(compgen -W "$_isthmus_commands" -- "$cur")
                fi ;;
        esac
    elif [[ $cmd == help ]]; then
        ((j == ci + 1)) && mapfile -t COMPREPLY < <(compgen -W "$_isthmus_commands" -- "$cur")
    elif [[ -z ${_isthmus_opts[$cmd]+set} ]]; then
        _isthmus_files any "$cur"
    else
        prev=${words[j - 1]}
        if ((j > ci + 1)) && [[ $prev == -* && $prev != *=* && \
            -n ${_isthmus_argkind["$cmd $prev"]+set} ]]; then
            _isthmus_value "$cmd" "$prev" "$cur"
        elif [[ $cur == -*=* ]]; then
            _isthmus_value "$cmd" "${cur%%=*}" "${cur#*=}"
            if [[ -n $pre ]]; then
                for i in "${!COMPREPLY[@]}"; do COMPREPLY[i]=$pre${COMPREPLY[i]}; done
            fi
        elif [[ $cur == -* ]]; then
            mapfile -t COMPREPLY < <(compgen -W "${_isthmus_opts[$cmd]}" -- "$cur")
            [[ ${#COMPREPLY[@]} -eq 1 && ${COMPREPLY[0]} == *= ]] && compopt -o nospace 2>/dev/null
        else
            # the place of this argument among the positional ones
            n=1
            for ((i = ci + 1; i < j; i++)); do
                w=${words[i]}
                if [[ $w == -* ]]; then
                    [[ $w != *=* && -n ${_isthmus_argkind["$cmd $w"]+set} ]] && ((i++))
                else
                    ((n++))
                fi
            done
            kind=${_isthmus_positional["$cmd $n"]}
            while [[ -z $kind ]] && ((n > 1)); do
                ((n--))
                kind=${_isthmus_positional["$cmd $n"]}
                [[ $kind == *... ]] || kind=
                [[ -n $kind ]] && break
                ((n == 1)) && break
            done
            [[ -n $kind ]] && _isthmus_files "$kind" "$cur"
        fi
    fi
    return 0
}

complete -F _isthmus isthmus
