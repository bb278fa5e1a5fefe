// Package slurmtest holds the integration test of the Slurm sample
// (samples/slurm-array.sh) on a real, single-node Slurm started on this
// machine: munged, slurmctld and slurmd from Debian's packages (munge,
// slurmctld, slurmd, slurm-client), each with its own socket, ports, state
// and spool directories in a temporary directory, so nothing of a system
// Slurm or MUNGE installation is used or changed.
//
// The test needs root (slurmd launches jobs as their owner) and the
// programs on PATH. Where either is missing it is skipped with a message,
// except under CI (CI=true), where it fails: .ci/run installs the packages.
// It is skipped under -short (it takes about ten seconds, mostly Slurm's
// scheduling).
package slurmtest
