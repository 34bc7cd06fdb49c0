//! (placeholder, being written)
