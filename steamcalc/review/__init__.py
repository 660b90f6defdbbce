"""The checker's tools: verify, diff, the register and the sign-off after a passing verify."""
