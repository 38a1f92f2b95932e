# bash completion for sitereach: commands, options, scenario files (*.json)
# and output folders. Installed by `make install` into
# share/bash-completion/completions/sitereach.
_sitereach()
{
    local cur prev cmd
    COMPREPLY=()
    cur=${COMP_WORDS[COMP_CWORD]}
    prev=${COMP_WORDS[COMP_CWORD-1]}
    if [ "$COMP_CWORD" -eq 1 ]; then
        COMPREPLY=($(compgen -W "check reach site supply plan compare links report --help --version" -- "$cur"))
        return 0
    fi
    cmd=${COMP_WORDS[1]}
    case $prev in
        -o|--out)
            COMPREPLY=($(compgen -d -- "$cur"))
            return 0
            ;;
        --threads)
            COMPREPLY=($(compgen -W "0 1 2 4 8" -- "$cur"))
            return 0
            ;;
    esac
    if [[ $cur == -* ]]; then
        case $cmd in
            check)  COMPREPLY=($(compgen -W "--json --quiet --help" -- "$cur")) ;;
            reach|site|plan|supply|compare|links)
                    COMPREPLY=($(compgen -W "-o --out --json --quiet --threads --help" -- "$cur")) ;;
            report) COMPREPLY=($(compgen -W "--json --quiet --help" -- "$cur")) ;;
        esac
        return 0
    fi
    case $cmd in
        report)
            COMPREPLY=($(compgen -d -- "$cur"))
            ;;
        *)
            # Scenario files, and folders to walk into.
            COMPREPLY=($(compgen -f -X '!*.json' -- "$cur") $(compgen -d -- "$cur"))
            ;;
    esac
    return 0
}
complete -o filenames -F _sitereach sitereach
