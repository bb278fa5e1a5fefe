// Package k8stest checks the Kubernetes sample (samples/k8s-indexed-job.yaml)
// offline against the Job API: the manifest is decoded strictly (unknown or
// misspelt fields and wrong types are errors) into the batch/v1 Job types of
// k8s.io/api, its names and quantities are checked with k8s.io/apimachinery's
// validators, and its Indexed-Job contract with skyframe's sharding is
// checked by calling flight.SelectShard the way each pod would.
//
// It is a module of its own so that the Kubernetes API modules stay out of
// skyframe's build; .ci/run runs it with `cd internal/k8stest && go test ./...`.
package k8stest
