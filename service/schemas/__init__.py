"""Request and response models of the API (pydantic v2)."""
