"""infoscope.report"""
