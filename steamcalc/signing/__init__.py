"""Keys and signatures: Ed25519 key files, trusted signers, signing and checking a record's signatures."""
