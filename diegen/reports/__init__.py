"""Composers over analysis results: the JSON document, its text form, the shop sheet and the wing summary."""
