"""Water and steam properties on IAPWS-IF97: SteamState, the array functions and the two engines."""
