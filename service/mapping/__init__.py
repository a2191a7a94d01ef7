"""One module per topic.

Requests to core inputs in SI, core results to response documents in the caller's units.
"""
