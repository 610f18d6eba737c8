//! Case files: the raw YAML schema, the validated case, path safety and input digests.
