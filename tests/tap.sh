# tap.sh - what the shell checks share, sourced after they set $src (". "$src/tests/tap.sh""):
# TAP lines with their counts, and Open MPI confined to this machine.
n=0 failed=0
check() {   # description, command...: one TAP line; the command's output is dropped
    desc=$1; shift
    n=$((n + 1))
    if "$@" >/dev/null 2>&1; then echo "ok $n - $desc"; else
        echo "not ok $n - $desc"; failed=$((failed + 1)); fi
}
same() {   # two files, both non-empty and equal
    test -s "$1" && test -s "$2" && cmp "$1" "$2"
}
tap_end() {   # label: the closing line "# LABEL: N passed, N failed"; fails if any failed
    echo "# $1: $((n - failed)) passed, $failed failed"
    [ $failed -eq 0 ]
}
# Open MPI on this machine only: shared memory between the ranks, the launcher's own traffic
# on the loopback interface; as root it needs the allow-run-as-root switches, and more ranks
# than cores need oversubscription. No binding to cores: OpenBLAS then sees the same
# processors in every rank as in one process.
mpi_local() {
    export OMPI_ALLOW_RUN_AS_ROOT=1 OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1
    export OMPI_MCA_btl=self,vader OMPI_MCA_oob_tcp_if_include=lo OMPI_MCA_btl_tcp_if_include=lo
    export OMPI_MCA_btl_vader_single_copy_mechanism=none OMPI_MCA_mpi_yield_when_idle=1
    export OMPI_MCA_hwloc_base_binding_policy=none OMPI_MCA_rmaps_base_oversubscribe=1
}
# mpirun ($mpirun) with its arguments. Open MPI's own start-up allocations are never freed
# (they would fail a LeakSanitizer run); leaks are checked on the single-process runs.
mpi() {
    ASAN_OPTIONS="${ASAN_OPTIONS:-}:detect_leaks=0" "$mpirun" "$@"
}
