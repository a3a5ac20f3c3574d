"""Water: IAPWS formulations and the water model."""
