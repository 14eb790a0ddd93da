"""inspector.sheets"""
