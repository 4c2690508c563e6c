"""The analyses: operating point, response, noise, large signal, feedback, spread."""
