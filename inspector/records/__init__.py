"""inspector.records"""
