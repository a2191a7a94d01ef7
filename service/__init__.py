"""gearwork HTTP service: schemas, unit conversion, error mapping and routes."""
