"""Output sets: one naming rule, one writer table, whole-or-nothing commits, a manifest that
knows which command made each file and from which inputs, and an index a shop can read."""

from .formats import WRITERS, Output, register_format
from .manifest import file_states, output_state, read_manifest, sha256_of, spec_digest
from .naming import FOLDERS, INDEX, MANIFEST, folder_of, output_name
from .staging import Committed, Staging, format_index, holding, write_set

__all__ = ["WRITERS", "Output", "register_format", "read_manifest", "sha256_of", "spec_digest", "FOLDERS",
           "INDEX", "MANIFEST", "folder_of", "output_name", "Committed", "Staging", "format_index", "holding",
           "output_state", "file_states", "write_set"]
