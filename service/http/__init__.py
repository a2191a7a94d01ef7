"""The HTTP edge.

Admission, limits, caching, headers, negotiation, problems, observability, OpenAPI.
"""
